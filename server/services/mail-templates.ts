import { readFileSync } from 'node:fs';
import path from 'node:path';

import Mustache from 'mustache';

import { projectRoot } from '../../db/root';

const folder = path.join(projectRoot, 'content', 'mail');
const cache = new Map<string, string>();

function template(name: string): string {
  let t = cache.get(name);
  if (t === undefined) {
    t = readFileSync(path.join(folder, name), 'utf8');
    // Parsing once keeps a digest run (hundreds of mails from one template) from re-parsing it.
    Mustache.parse(t);
    cache.set(name, t);
  }
  return t;
}

/** The text part is plain text: nothing in it is HTML, so nothing is escaped. */
const asText = { escape: (value: unknown) => String(value) };

/**
 * The HTML part escapes the five characters that matter in text and attribute values, and leaves
 * `/` and `=` as they are (mustache's own escape turns them into entities, which makes the
 * links in a mail's source hard to read and compare).
 */
const escapeHtml = (value: unknown) =>
  String(value).replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
const asHtml = { escape: escapeHtml };

export type RenderedMail = { subject: string; text: string; html: string };

const footer = 'Bathynote records what the science party sees. It is not a navigation or vehicle-control system.';

/**
 * A mail from the mustache templates `content/mail/<name>.txt` and `.html`, the HTML inside the
 * shared layout. `{{name}}` is HTML-escaped in the HTML part; `{{{name}}}` is for HTML the caller
 * has already made safe (a note rendered through the sanitizer). Sections (`{{#entries}}`) loop.
 */
export function renderMail(name: string, subject: string, view: Record<string, unknown>): RenderedMail {
  const body = Mustache.render(template(`${name}.html`), view, {}, asHtml);
  return {
    subject,
    text: `${Mustache.render(template(`${name}.txt`), view, {}, asText)}\n--\n${footer}\n`,
    html: Mustache.render(template('layout.html'), { subject, footer, body }, {}, asHtml),
  };
}
