import createDOMPurify from 'dompurify';
import type * as Jsdom from 'jsdom';

import { createNoteRenderer, type NoteRenderer } from '../../lib/notes';

let renderer: NoteRenderer | undefined;

/**
 * One window for the whole process, built on first use: building a jsdom window is slow, and
 * DOMPurify only needs it as a parser and node factory. Only the digests render notes on the
 * server, so jsdom (about 100 MB resident once loaded) is required then, not at start.
 */
function noteRenderer(): NoteRenderer {
  if (!renderer) {
    const { JSDOM } = require('jsdom') as typeof Jsdom;
    renderer = createNoteRenderer(createDOMPurify(new JSDOM('').window));
  }
  return renderer;
}

/** Sanitized HTML of an observation note, for API responses, digest mails and exports. */
export function renderNoteHtml(markdown: string): string {
  return noteRenderer().toHtml(markdown);
}

/** Plain text of an observation note, for mail text parts, search indexing and CSV. */
export function noteToPlainText(markdown: string): string {
  return noteRenderer().toPlainText(markdown);
}
