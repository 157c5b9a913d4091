import { readFileSync } from 'node:fs';
import path from 'node:path';
import { projectRoot } from '../../db/root';

const folder = path.join(projectRoot, 'content', 'mail');
const cache = new Map<string, string>();

function template(name: string): string {
  let t = cache.get(name);
  if (t === undefined) {
    t = readFileSync(path.join(folder, name), 'utf8');
    cache.set(name, t);
  }
  return t;
}

const escapeHtml = (s: string) =>
  s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');

/**
 * Fills `{{name}}` from `values` (HTML-escaped in .html templates) and `{{{name}}}` with HTML
 * the caller has already made safe (a rendered, sanitized note, another template).
 */
function fill(text: string, values: Record<string, string>, raw: Record<string, string> | null): string {
  return text
    .replace(/\{\{\{(\w+)\}\}\}/g, (_m, k: string) => (raw ? (raw[k] ?? '') : (values[k] ?? '')))
    .replace(/\{\{(\w+)\}\}/g, (_m, k: string) => (raw ? escapeHtml(values[k] ?? '') : (values[k] ?? '')));
}

export type RenderedMail = { subject: string; text: string; html: string };

/**
 * A mail from `content/mail/<name>.txt` and `.html`, the HTML inside the shared layout. `html`
 * holds pieces of HTML that are already safe, for the `{{{name}}}` slots of the HTML template;
 * the text template reads the same slots from `values`.
 */
export function renderMail(name: string, subject: string, values: Record<string, string>, html: Record<string, string> = {}): RenderedMail {
  const footer = 'Bathynote records what the science party sees. It is not a navigation or vehicle-control system.';
  const body = fill(template(`${name}.html`), values, html);
  return {
    subject,
    text: `${fill(template(`${name}.txt`), values, null)}\n--\n${footer}\n`,
    html: fill(template('layout.html'), { subject, footer }, { body }),
  };
}
