import createDOMPurify from 'dompurify';
import { JSDOM } from 'jsdom';
import { describe, expect, it, vi } from 'vitest';
import { createNoteRenderer, type HtmlSanitizer } from '@/lib/notes';
import { noteToPlainText, renderNoteHtml } from '@/server/services/notes';
import { XSS_VECTORS, type XssVector } from '@/tests/fixtures/xss-vectors';

const DANGEROUS_ELEMENTS = new Set([
  'script',
  'iframe',
  'frame',
  'frameset',
  'object',
  'embed',
  'applet',
  'svg',
  'math',
  'form',
  'input',
  'button',
  'textarea',
  'select',
  'base',
  'meta',
  'link',
  'style',
  'template',
  'noscript',
]);
const URL_ATTRIBUTES = new Set([
  'href',
  'src',
  'action',
  'formaction',
  'xlink:href',
  'data',
  'background',
  'poster',
  'dynsrc',
  'lowsrc',
  'srcset',
  'cite',
  'codebase',
  'ping',
]);
const DANGEROUS_SCHEMES = ['javascript:', 'vbscript:', 'livescript:', 'data:'];
// Everything a browser or a sloppy URL parser might skip inside a scheme.
const URL_NOISE = /[\s\u0000-\u001f\u007f-\u009f\u00a0\u1680\u180e\u2000-\u200b\u2028\u2029\u205f\u3000\ufeff]/g;

/**
 * Lists what in `html` could run script or navigate to script, as a browser
 * would parse it: attribute values are read from the parsed DOM, so they are
 * already entity-decoded.
 */
function findDangerousMarkup(html: string): string[] {
  const findings: string[] = [];
  if (/<script/i.test(html)) findings.push('"<script" in markup');

  const visit = (root: DocumentFragment | Element): void => {
    for (const element of Array.from(root.querySelectorAll('*'))) {
      const tag = element.localName.toLowerCase();
      if (DANGEROUS_ELEMENTS.has(tag)) findings.push(`<${tag}> element`);
      for (const attribute of Array.from(element.attributes)) {
        const name = attribute.name.toLowerCase();
        if (name.startsWith('on')) findings.push(`${name} handler on <${tag}>`);
        if (name === 'style') findings.push(`style attribute on <${tag}>`);
        if (URL_ATTRIBUTES.has(name) || name.endsWith(':href')) {
          const compact = attribute.value.replace(URL_NOISE, '').toLowerCase();
          const scheme = DANGEROUS_SCHEMES.find((s) => compact.startsWith(s));
          if (scheme) findings.push(`${scheme} URL in ${name} on <${tag}>`);
        }
      }
      if (tag === 'template') visit((element as HTMLTemplateElement).content);
    }
  };
  visit(JSDOM.fragment(html));
  return findings;
}

/** Each payload typed into a note in the places a scientist might put it. */
function notesFor(vector: XssVector): string[] {
  const { payload } = vector;
  if (vector.syntax === 'html') {
    return [payload, `Sighting at 812 m: ${payload} then ascent.`, `- ${payload}`];
  }
  return [payload, `> ${payload.replace(/\n/g, '\n> ')}`];
}

const identity: HtmlSanitizer = { sanitize: (dirty) => dirty };

describe('payload list', () => {
  it('has at least 40 payloads, each with a named source and technique', () => {
    expect(XSS_VECTORS.length).toBeGreaterThanOrEqual(40);
    for (const vector of XSS_VECTORS) {
      expect(vector.source.length).toBeGreaterThan(10);
      expect(vector.technique.length).toBeGreaterThan(3);
    }
  });

  it('draws on both sources and uses both raw HTML and Markdown syntax', () => {
    const sources = new Set(XSS_VECTORS.map((v) => v.source));
    expect([...sources].some((s) => s.includes('OWASP'))).toBe(true);
    expect([...sources].some((s) => s.includes('DOMPurify'))).toBe(true);
    expect(XSS_VECTORS.filter((v) => v.syntax === 'html').length).toBeGreaterThanOrEqual(20);
    expect(XSS_VECTORS.filter((v) => v.syntax === 'markdown').length).toBeGreaterThanOrEqual(20);
  });

  it('has no duplicate payloads', () => {
    const payloads = XSS_VECTORS.map((v) => v.payload);
    expect(new Set(payloads).size).toBe(payloads.length);
  });
});

describe('dangerous-markup detector', () => {
  it.each([
    ['<script>alert(1)</script>', '"<script" in markup'],
    ['<img src="x" onerror="alert(1)">', 'onerror handler on <img>'],
    ['<a href="jav&#x09;ascript:alert(1)">x</a>', 'javascript: URL in href on <a>'],
    ['<a href=" JaVaScRiPt:alert(1)">x</a>', 'javascript: URL in href on <a>'],
    ['<a href="\u2028javascript:alert(1)">x</a>', 'javascript: URL in href on <a>'],
    ['<img src="VBSCRIPT:msgbox(1)">', 'vbscript: URL in src on <img>'],
    ['<a href="data:text/html;base64,PHNjcmlwdD4=">x</a>', 'data: URL in href on <a>'],
    ['<form action="javascript:alert(1)"></form>', 'javascript: URL in action on <form>'],
    ['<button formaction="javascript:alert(1)">x</button>', 'javascript: URL in formaction on <button>'],
    ['<svg><a xlink:href="javascript:alert(1)">x</a></svg>', 'javascript: URL in xlink:href on <a>'],
    ['<iframe src="https://example.org"></iframe>', '<iframe> element'],
    ['<object data="x"></object>', '<object> element'],
    ['<embed src="x">', '<embed> element'],
    ['<svg></svg>', '<svg> element'],
    ['<form></form>', '<form> element'],
    ['<template><img src=x onerror=alert(1)></template>', 'onerror handler on <img>'],
  ])('flags %s', (html, finding) => {
    expect(findDangerousMarkup(html)).toContain(finding);
  });

  it.each([
    '<p>Dense <em>Lophelia pertusa</em> at 812 m.</p>',
    '<p><a href="https://www.marinespecies.org/" rel="noopener noreferrer nofollow" target="_blank">WoRMS</a></p>',
    '<p><a href="mailto:chief@example.org">chief</a></p>',
    '<p><img src="/api/photos/0427/frame-12.jpg" alt="frame"></p>',
    '<p title="javascript:alert(1)">the word javascript: as text</p>',
    '<pre><code>&lt;script&gt;alert(1)&lt;/script&gt;</code></pre>',
  ])('accepts safe markup %s', (html) => {
    expect(findDangerousMarkup(html)).toEqual([]);
  });

  it('catches most payloads when the sanitizer is switched off', () => {
    const unsafe = createNoteRenderer(identity);
    const flagged = XSS_VECTORS.map((vector) => notesFor(vector).flatMap((note) => findDangerousMarkup(unsafe.toHtml(note))));
    const flaggedCount = flagged.filter((findings) => findings.length > 0).length;
    expect(flaggedCount).toBeGreaterThan(XSS_VECTORS.length / 2);
    const all = flagged.flat();
    expect(all.some((f) => f === '"<script" in markup')).toBe(true);
    expect(all.some((f) => /^on\w+ handler/.test(f))).toBe(true);
    expect(all.some((f) => f.startsWith('javascript: URL in href'))).toBe(true);
    expect(all.some((f) => f.startsWith('data: URL'))).toBe(true);
  });
});

describe('server note pipeline against script injection', () => {
  for (const vector of XSS_VECTORS) {
    it(`neutralises ${vector.syntax} payload: ${vector.technique}`, () => {
      for (const note of notesFor(vector)) {
        const html = renderNoteHtml(note);
        expect({ note, findings: findDangerousMarkup(html) }).toEqual({ note, findings: [] });
        expect(() => noteToPlainText(note)).not.toThrow();
      }
    });
  }

  it('drops script content from the plain text', () => {
    expect(noteToPlainText('Before <script>alert(1)</script> after')).toBe('Before after');
  });
});

describe('note sanitizer policy', () => {
  it('keeps http, https and mailto links and marks them as external', () => {
    for (const href of ['http://example.org/a', 'https://doi.org/10.1594/PANGAEA.1', 'mailto:chief@example.org']) {
      const link = JSDOM.fragment(renderNoteHtml(`[x](${href})`)).querySelector('a');
      expect(link?.getAttribute('href')).toBe(href);
      expect(link?.getAttribute('rel')).toBe('noopener noreferrer nofollow');
      expect(link?.getAttribute('target')).toBe('_blank');
    }
  });

  it('removes the target of links with any other scheme or a relative path', () => {
    for (const href of ['ftp://example.org/a', 'tel:+4412345', 'file:///etc/passwd', '/dives/12', '#top', '//example.org/x']) {
      const link = JSDOM.fragment(renderNoteHtml(`[x](${href})`)).querySelector('a');
      expect(link?.hasAttribute('href')).toBe(false);
      expect(link?.hasAttribute('target')).toBe(false);
      expect(link?.textContent).toBe('x');
    }
  });

  it('overrides rel and target written into raw HTML links', () => {
    const link = JSDOM.fragment(renderNoteHtml('<a href="https://example.org" target="_self" rel="opener">x</a>')).querySelector('a');
    expect(link?.getAttribute('rel')).toBe('noopener noreferrer nofollow');
    expect(link?.getAttribute('target')).toBe('_blank');
  });

  it('keeps http(s) images and photos served by the API', () => {
    for (const src of [
      'https://example.org/a.jpg',
      'http://example.org/a.jpg',
      '/api/photos/0427/frame-12.jpg',
      '/api/photos/abc?size=thumb',
    ]) {
      const img = JSDOM.fragment(renderNoteHtml(`![frame](${src})`)).querySelector('img');
      expect(img?.getAttribute('src')).toBe(src);
      expect(img?.getAttribute('alt')).toBe('frame');
    }
  });

  it('replaces other images by their alt text', () => {
    for (const src of [
      'data:image/png;base64,iVBORw0KGgo=',
      '/api/photos/../admin',
      '/api/photos/%2e%2e/admin',
      '/api/photos\\..\\admin',
      '/uploads/a.jpg',
      '//example.org/api/photos/a.jpg',
      'ftp://example.org/a.jpg',
    ]) {
      const html = renderNoteHtml(`![frame](${src})`);
      expect(JSDOM.fragment(html).querySelector('img')).toBeNull();
      expect(html).toBe('<p>frame</p>\n');
    }
  });

  it('keeps code language classes and drops every other class', () => {
    expect(renderNoteHtml('```python\nprint(1)\n```')).toContain('<code class="language-python">');
    expect(renderNoteHtml('<span class="admin-banner">x</span>')).toBe('<p><span>x</span></p>\n');
  });

  it('removes style, id and data attributes', () => {
    expect(renderNoteHtml('<p style="position:fixed" id="login" data-x="1">x</p>')).toBe('<p>x</p>');
  });

  it('registers its hooks once per DOMPurify instance', () => {
    const purify = createDOMPurify(new JSDOM('').window);
    const addHook = vi.spyOn(purify, 'addHook');
    const first = createNoteRenderer(purify);
    const second = createNoteRenderer(purify);
    expect(addHook).toHaveBeenCalledTimes(2);
    expect(first.toHtml('[x](https://example.org)')).toBe(second.toHtml('[x](https://example.org)'));
  });

  it('refuses a DOMPurify instance without a DOM, which would pass HTML through', () => {
    expect(() => createNoteRenderer(createDOMPurify())).toThrow(/no DOM/);
  });

  it('leaves other uses of the same DOMPurify instance alone', () => {
    const purify = createDOMPurify(new JSDOM('').window);
    createNoteRenderer(purify).toHtml('[x](https://example.org)');
    expect(purify.sanitize('<a href="https://example.org">x</a>')).toBe('<a href="https://example.org">x</a>');
  });

  it('never throws, whatever the note', () => {
    const notes = [
      '',
      '\u0000',
      '\ud800 lone surrogate \udfff',
      '>'.repeat(500) + ' deep',
      '['.repeat(5000),
      '*'.repeat(5000) + 'a',
      '<'.repeat(2000),
      '| a |\n|'.repeat(500),
      '```\n' + '`'.repeat(3000),
      'a\r\nb\rc\n',
    ];
    for (const note of notes) {
      expect(() => renderNoteHtml(note)).not.toThrow();
      expect(() => noteToPlainText(note)).not.toThrow();
    }
    const unsafeInput = null as unknown as string;
    expect(renderNoteHtml(unsafeInput)).toBe('');
  });

  it('shows the note as escaped text when the sanitizer fails', () => {
    const failing: HtmlSanitizer = {
      sanitize: () => {
        throw new Error('sanitizer failure');
      },
    };
    const renderer = createNoteRenderer(failing);
    expect(renderer.toHtml('a <b onclick="x">\nc & d')).toBe('<p>a &lt;b onclick=&quot;x&quot;&gt;<br>c &amp; d</p>');
    expect(renderer.toPlainText('a <b>\nc')).toBe('a <b>\nc');
  });
});
