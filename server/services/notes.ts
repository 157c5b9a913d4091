import createDOMPurify from 'dompurify';
import { JSDOM } from 'jsdom';
import { createNoteRenderer, type NoteRenderer } from '../../lib/notes';

// One window for the whole process: building a jsdom window is slow, and
// DOMPurify only needs it as a parser and node factory.
const { window } = new JSDOM('');
const renderer: NoteRenderer = createNoteRenderer(createDOMPurify(window));

/** Sanitized HTML of an observation note, for API responses, digest mails and exports. */
export function renderNoteHtml(markdown: string): string {
  return renderer.toHtml(markdown);
}

/** Plain text of an observation note, for mail text parts, search indexing and CSV. */
export function noteToPlainText(markdown: string): string {
  return renderer.toPlainText(markdown);
}
