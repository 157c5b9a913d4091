/**
 * The script-injection payloads of tests/fixtures/xss-vectors.ts (each with its published source)
 * typed into a note in real Chromium, through the browser's own instance of the note pipeline
 * (marked, then DOMPurify on `window`): the preview beside the note must carry nothing that runs
 * or navigates to script, and nothing may run. The same payloads go through the server's instance,
 * and through the pipeline with the sanitizer taken out (where they must be caught), in
 * tests/unit/notes-xss.test.ts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { XSS_VECTORS } from '../fixtures/xss-vectors';
import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { diveScreenDrawn } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let browser: Browser;

beforeAll(async () => {
  server = await startServerProcess();
  browser = await openBrowser(viewports.wide);
  // Anything a payload manages to run calls one of these, or throws (collected in browser.errors).
  await browser.context.addInitScript(() => {
    const w = window as unknown as Record<string, unknown>;
    w.__ran = [];
    for (const name of ['alert', 'confirm', 'prompt', 'print']) {
      w[name] = (...args: unknown[]) => (w.__ran as unknown[]).push([name, ...args]);
    }
  });
});
afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

/** What in the element could run script or navigate to it, read from the live DOM. */
function dangerIn(page: Page, testId: string): Promise<string[]> {
  return page.evaluate((id) => {
    // The rendered note itself (the preview also holds the note's own stylesheet, beside it).
    const root = document.querySelector(`[data-testid="${id}"] .bn-note, .bn-note[data-testid="${id}"]`);
    if (!root) return ['rendered note missing'];
    const found: string[] = [];
    const bad =
      /^(script|iframe|frame|frameset|object|embed|applet|svg|math|form|input|button|textarea|select|base|meta|link|style|template|noscript)$/;
    const urlAttrs = /^(href|src|action|formaction|xlink:href|data|background|poster|dynsrc|lowsrc|srcset|cite|codebase|ping)$/;
    for (const el of Array.from(root.querySelectorAll('*'))) {
      const tag = el.localName.toLowerCase();
      if (bad.test(tag)) found.push(`<${tag}>`);
      for (const a of Array.from(el.attributes)) {
        const name = a.name.toLowerCase();
        if (name.startsWith('on')) found.push(`${name} on <${tag}>`);
        if (name === 'style') found.push(`style on <${tag}>`);
        if (urlAttrs.test(name) || name.endsWith(':href')) {
          const compact = a.value.replace(
            /[\s\u0000-\u001f\u007f-\u009f\u00a0\u1680\u180e\u2000-\u200b\u2028\u2029\u205f\u3000\ufeff]/g,
            '',
          );
          if (/^(javascript|vbscript|livescript|data):/i.test(compact)) found.push(`${compact.slice(0, 12)} in ${name} on <${tag}>`);
        }
      }
    }
    return found;
  }, testId);
}

describe('a note typed with script in it, in the browser', () => {
  it(`shows none of ${XSS_VECTORS.length} published payloads as anything that runs`, async () => {
    const { page } = browser;
    await signInAs(page, server.url, 'biologist@bathynote.test');
    await page.getByTestId('campaign-list').getByText('Varn Shoal 2026').click();
    await page.getByTestId('dive-VS-03').click();
    await diveScreenDrawn(page, 'VS-03');
    await page.getByTestId('new-observation').click();
    const note = page.getByTestId('field-note');
    const preview = page.getByTestId('note-preview');
    await note.waitFor();
    const findings: string[] = [];
    for (const [i, vector] of XSS_VECTORS.entries()) {
      const marker = `payload-${i}`;
      await note.fill(`${marker}\n\n${vector.payload}`);
      await preview.getByText(marker).waitFor();
      for (const f of await dangerIn(page, 'note-preview')) findings.push(`${vector.technique}: ${f}`);
      // What a payload could set off comes from its images failing or loading: wait until every
      // image of the preview has done one or the other, and a task queued after those events ran.
      await page.waitForFunction(() =>
        Array.from(document.querySelectorAll('[data-testid="note-preview"] img')).every((i) => (i as HTMLImageElement).complete),
      );
      await page.evaluate(() => new Promise((resolve) => setTimeout(resolve, 0)));
    }
    expect(findings).toEqual([]);
    expect(await page.evaluate(() => (window as unknown as { __ran: unknown[] }).__ran)).toEqual([]);
    expect(browser.errors).toEqual([]);
  });
});
