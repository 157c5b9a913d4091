import { Marked } from 'marked';
import type { Config, DOMPurify, ElementHook, UponSanitizeAttributeHook } from 'dompurify';

/**
 * The one Markdown pipeline for observation notes: marked (CommonMark + GFM)
 * followed by an injected DOMPurify instance. The browser passes
 * `DOMPurify(window)`, the server `DOMPurify(new JSDOM('').window)`, so the web
 * app, digest mails and exports all show exactly the same sanitized HTML.
 */

/** Anything that turns untrusted HTML into safe HTML under the given DOMPurify config. */
export interface HtmlSanitizer {
  sanitize(dirty: string, config: Config): string;
}

/**
 * A DOMPurify instance gets the full policy (per-element URL rules and link
 * attributes are enforced by hooks); a bare `HtmlSanitizer` only receives the
 * config and is meant for tests.
 */
export type NoteSanitizer = DOMPurify | HtmlSanitizer;

export interface NoteRenderer {
  /** Sanitized HTML for the web app and mail HTML parts. Never throws. */
  toHtml(markdown: string): string;
  /** The rendered text without markup, for mail text parts, search indexing and CSV. Never throws. */
  toPlainText(markdown: string): string;
}

const LINK_REL = 'noopener noreferrer nofollow';
const LINK_TARGET = '_blank';

// Element allowlist: anything not listed (script, style, iframe, svg, math,
// form controls, ...) is removed, keeping its text where DOMPurify allows.
const ALLOWED_TAGS = [
  'p',
  'br',
  'hr',
  'h1',
  'h2',
  'h3',
  'h4',
  'h5',
  'h6',
  'strong',
  'b',
  'em',
  'i',
  'del',
  's',
  'ins',
  'sub',
  'sup',
  'mark',
  'small',
  'kbd',
  'abbr',
  'code',
  'pre',
  'blockquote',
  'ul',
  'ol',
  'li',
  'dl',
  'dt',
  'dd',
  'table',
  'thead',
  'tbody',
  'tfoot',
  'tr',
  'th',
  'td',
  'caption',
  'a',
  'img',
  'span',
];

// Also listed explicitly so that widening ALLOWED_TAGS by mistake cannot let them in.
const FORBIDDEN_TAGS = [
  'script',
  'style',
  'iframe',
  'frame',
  'frameset',
  'object',
  'embed',
  'applet',
  'form',
  'input',
  'button',
  'textarea',
  'select',
  'option',
  'svg',
  'math',
  'link',
  'meta',
  'base',
  'template',
  'noscript',
];

const ALLOWED_ATTR = ['href', 'title', 'src', 'alt', 'align', 'start', 'colspan', 'rowspan', 'class'];

// Union of every URL the policy can accept; the hooks then narrow it per element.
const ALLOWED_URI_REGEXP = /^(?:(?:https?|mailto):|\/api\/photos\/)/i;

const SANITIZE_CONFIG: Config = {
  ALLOWED_TAGS,
  ALLOWED_ATTR,
  FORBID_TAGS: FORBIDDEN_TAGS,
  FORBID_ATTR: ['style', 'id', 'name', 'srcset', 'action', 'formaction', 'xlink:href'],
  ALLOWED_URI_REGEXP,
  // Without this DOMPurify would test these plain values against the URL regexp.
  ADD_URI_SAFE_ATTR: ['align', 'start', 'colspan', 'rowspan'],
  ALLOW_DATA_ATTR: false,
  ALLOW_ARIA_ATTR: false,
  ALLOW_UNKNOWN_PROTOCOLS: false,
  RETURN_DOM: false,
  RETURN_DOM_FRAGMENT: false,
  RETURN_TRUSTED_TYPE: false,
  WHOLE_DOCUMENT: false,
};

const markdown = new Marked({
  async: false,
  gfm: true,
  breaks: false,
  pedantic: false,
  silent: false,
  renderer: {
    // The sanitizer removes <input>, which would silently drop the state of
    // task-list items such as "- [x] sample bagged"; a ballot box keeps it.
    checkbox({ checked }) {
      return checked ? '\u2611 ' : '\u2610 ';
    },
  },
});

/**
 * The bare Markdown step (marked, CommonMark + GFM) with NO sanitizing.
 * Its output must never reach a page or a mail; it exists so the Markdown
 * dialect can be checked against the CommonMark spec on its own.
 */
export function markdownToUnsafeHtml(source: string): string {
  return markdown.parse(source, { async: false });
}

/**
 * Browsers drop leading/trailing C0 controls and spaces and every tab or
 * newline from a URL before reading its scheme (WHATWG URL Standard, basic URL
 * parser), so "java\tscript:" is javascript:. Decisions are made on that form.
 */
function normaliseUrl(value: string): string {
  // Control characters are exactly what the URL parser strips, so the pattern must name them.
  // eslint-disable-next-line no-control-regex
  return value.replace(/^[\u0000-\u0020]+|[\u0000-\u0020]+$/g, '').replace(/[\t\n\r]/g, '');
}

function schemeOf(url: string): string | null {
  const match = /^([a-zA-Z][a-zA-Z0-9+.-]*):/.exec(url);
  return match?.[1]?.toLowerCase() ?? null;
}

const LINK_SCHEMES = new Set(['http', 'https', 'mailto']);
const IMAGE_SCHEMES = new Set(['http', 'https']);
// Same-origin photos only; no percent-escapes or backslashes, which browsers
// would turn into "..", and no dot segments.
const PHOTO_PATH = /^\/api\/photos\/[A-Za-z0-9._~/-]+(?:\?[A-Za-z0-9._~=&-]*)?$/;

function isAllowedLinkUrl(url: string): boolean {
  const scheme = schemeOf(url);
  return scheme !== null && LINK_SCHEMES.has(scheme);
}

function isAllowedImageUrl(url: string): boolean {
  const scheme = schemeOf(url);
  if (scheme !== null) return IMAGE_SCHEMES.has(scheme);
  if (!PHOTO_PATH.test(url)) return false;
  const path = url.split('?')[0] ?? '';
  return !path.split('/').some((segment) => segment === '.' || segment === '..');
}

const CODE_LANGUAGE_CLASS = /^language-[A-Za-z0-9_+#.-]+$/;

interface HookState {
  // Hooks live on the DOMPurify instance and would also fire for sanitize()
  // calls made elsewhere with the same instance; they act only while > 0.
  depth: number;
}

const hookStates = new WeakMap<object, HookState>();

function isDomPurify(purify: NoteSanitizer): purify is DOMPurify {
  return typeof (purify as Partial<DOMPurify>).addHook === 'function';
}

function installHooks(purify: DOMPurify): HookState {
  const existing = hookStates.get(purify);
  if (existing) return existing;
  const state: HookState = { depth: 0 };

  const checkAttribute: UponSanitizeAttributeHook = (node, event) => {
    if (state.depth === 0) return;
    const tag = node.nodeName.toLowerCase();
    const name = event.attrName;
    if (name === 'href' || name === 'src') {
      const url = normaliseUrl(event.attrValue);
      const allowed =
        (tag === 'a' && name === 'href' && isAllowedLinkUrl(url)) || (tag === 'img' && name === 'src' && isAllowedImageUrl(url));
      event.keepAttr = allowed;
      if (allowed) event.attrValue = url;
    } else if (name === 'class') {
      event.keepAttr = tag === 'code' && CODE_LANGUAGE_CLASS.test(event.attrValue);
    }
  };

  const finishElement: ElementHook = (node) => {
    if (state.depth === 0) return;
    const tag = node.nodeName.toLowerCase();
    if (tag === 'img' && !node.hasAttribute('src')) {
      // A refused image would otherwise leave an empty box; its alt text keeps the meaning.
      const alt = node.getAttribute('alt') ?? '';
      const document = node.ownerDocument;
      if (alt && document) node.replaceWith(document.createTextNode(alt));
      else node.remove();
      return;
    }
    if (tag !== 'a') return;
    if (node.hasAttribute('href')) {
      node.setAttribute('rel', LINK_REL);
      node.setAttribute('target', LINK_TARGET);
    } else {
      node.removeAttribute('rel');
      node.removeAttribute('target');
    }
  };

  purify.addHook('uponSanitizeAttribute', checkAttribute);
  purify.addHook('afterSanitizeAttributes', finishElement);
  hookStates.set(purify, state);
  return state;
}

function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** What is shown when marked or the sanitizer fails: the note as escaped text, nothing lost. */
function fallbackHtml(source: string): string {
  return `<p>${escapeHtml(source).replace(/\r\n?|\n/g, '<br>')}</p>`;
}

const NAMED_ENTITIES: Record<string, string> = {
  amp: '&',
  lt: '<',
  gt: '>',
  quot: '"',
  apos: "'",
  nbsp: '\u00a0',
};

function decodeEntities(text: string): string {
  const pattern = /&(?:#(\d+)|#[xX]([0-9a-fA-F]+)|([a-zA-Z]+));/g;
  return text.replace(pattern, (whole: string, dec?: string, hex?: string, name?: string) => {
    const digits = dec ?? hex;
    if (digits !== undefined) {
      const code = Number.parseInt(digits, dec !== undefined ? 10 : 16);
      if (code > 0 && code <= 0x10ffff && !(code >= 0xd800 && code <= 0xdfff)) {
        return String.fromCodePoint(code);
      }
      return '\ufffd';
    }
    return (name !== undefined ? NAMED_ENTITIES[name] : undefined) ?? whole;
  });
}

// Elements whose edges end a paragraph in plain text, and those that only end a line.
const PARAGRAPH_TAGS = new Set(['p', 'h1', 'h2', 'h3', 'h4', 'h5', 'h6', 'pre', 'blockquote', 'table', 'hr', 'dl']);
const LINE_TAGS = new Set(['br', 'li', 'tr', 'ul', 'ol', 'dt', 'dd', 'caption', 'thead', 'tbody', 'tfoot']);
const CELL_TAGS = new Set(['td', 'th']);

const TAG_OR_COMMENT = /<!--[\s\S]*?-->|<(\/?)([a-zA-Z][a-zA-Z0-9]*)((?:[^>"']|"[^"]*"|'[^']*')*)>/g;

function altTextOf(attributes: string): string {
  const match = /\salt\s*=\s*(?:"([^"]*)"|'([^']*)'|([^\s>]+))/i.exec(attributes);
  if (!match) return '';
  return decodeEntities(match[1] ?? match[2] ?? match[3] ?? '');
}

/**
 * Text of sanitized HTML. It relies on the input being DOMPurify's own
 * serialization (text escaped, attributes double-quoted), which makes a
 * tag-level scan exact without needing a DOM in the browser bundle.
 */
export function htmlToPlainText(html: string): string {
  let out = '';
  let preDepth = 0;
  let lastIndex = 0;

  const appendText = (raw: string): void => {
    let text = decodeEntities(raw);
    if (preDepth === 0) {
      text = text.replace(/\s+/g, ' ');
      if (out === '' || /\s$/.test(out)) text = text.replace(/^ /, '');
    }
    out += text;
  };
  const breakLine = (count: 1 | 2): void => {
    out = out.replace(/[ \t]+$/, '');
    if (out === '') return;
    const have = /\n*$/.exec(out)?.[0].length ?? 0;
    if (have < count) out += '\n'.repeat(count - have);
  };

  for (const match of html.matchAll(TAG_OR_COMMENT)) {
    appendText(html.slice(lastIndex, match.index));
    lastIndex = match.index + match[0].length;
    const tag = match[2]?.toLowerCase();
    if (tag === undefined) continue;
    const closing = match[1] === '/';
    if (tag === 'pre') preDepth = Math.max(0, preDepth + (closing ? -1 : 1));
    if (tag === 'img' && !closing) {
      const alt = altTextOf(match[3] ?? '');
      if (alt) appendText(` ${alt} `);
    } else if (PARAGRAPH_TAGS.has(tag)) {
      breakLine(2);
    } else if (LINE_TAGS.has(tag)) {
      breakLine(1);
    } else if (CELL_TAGS.has(tag) && closing && out !== '' && !/\s$/.test(out)) {
      out += ' ';
    }
  }
  appendText(html.slice(lastIndex));

  return out
    .replace(/[ \t\u00a0]+$/gm, '')
    .replace(/\n{3,}/g, '\n\n')
    .replace(/^\n+/, '')
    .trimEnd();
}

export function createNoteRenderer(purify: NoteSanitizer): NoteRenderer {
  // DOMPurify created without a DOM either lacks sanitize() or returns its
  // input unchanged; refusing it here keeps a wiring mistake from going live.
  if ((purify as Partial<DOMPurify>).isSupported === false || typeof purify.sanitize !== 'function') {
    throw new Error('DOMPurify has no DOM to work with: pass DOMPurify(window) or DOMPurify(new JSDOM().window)');
  }
  const hookState = isDomPurify(purify) ? installHooks(purify) : null;

  const sanitize = (html: string): string => {
    if (hookState) hookState.depth += 1;
    try {
      return String(purify.sanitize(html, SANITIZE_CONFIG));
    } finally {
      if (hookState) hookState.depth -= 1;
    }
  };

  const toHtml = (source: string): string => {
    const text = typeof source === 'string' ? source : '';
    let html: string;
    try {
      html = markdownToUnsafeHtml(text);
    } catch {
      html = fallbackHtml(text);
    }
    try {
      return sanitize(html);
    } catch {
      // Escaped text is safe without a sanitizer.
      return fallbackHtml(text);
    }
  };

  const toPlainText = (source: string): string => {
    try {
      return htmlToPlainText(toHtml(source));
    } catch {
      return typeof source === 'string' ? source.replace(/\s+/g, ' ').trim() : '';
    }
  };

  return { toHtml, toPlainText };
}
