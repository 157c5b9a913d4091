import type { CDPSession, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, viewports } from '../helpers/chromium';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess();
});
afterAll(async () => {
  await server?.stop();
});

type Transfer = { url: string; status: number; mimeType: string; headers: Record<string, string>; bytes: number };

/**
 * Every response of the page as the DevTools protocol sees it: `encodedDataLength` is what crossed
 * the wire (headers and the body as sent, compressed or not).
 */
async function recordTransfers(page: Page): Promise<{ transfers: Map<string, Transfer>; cdp: CDPSession }> {
  const cdp = await page.context().newCDPSession(page);
  const transfers = new Map<string, Transfer>();
  cdp.on('Network.responseReceived', (e) => {
    const headers: Record<string, string> = {};
    for (const [name, value] of Object.entries(e.response.headers)) headers[name.toLowerCase()] = String(value);
    transfers.set(e.requestId, { url: e.response.url, status: e.response.status, mimeType: e.response.mimeType, headers, bytes: 0 });
  });
  cdp.on('Network.loadingFinished', (e) => {
    const t = transfers.get(e.requestId);
    if (t) t.bytes = e.encodedDataLength;
  });
  // A cold load: nothing from an earlier visit.
  await cdp.send('Network.enable');
  await cdp.send('Network.setCacheDisabled', { cacheDisabled: true });
  return { transfers, cdp };
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;

describe('the app over a thin link', () => {
  it('sends the bundle and the API answers compressed, and hashed assets cached for a year', async () => {
    const screen = await openBrowser(viewports.phone);
    try {
      const page = screen.page;
      const { transfers } = await recordTransfers(page);

      await page.goto(server.url);
      await page.getByTestId('sign-in-email').waitFor();
      await page.waitForLoadState('networkidle');
      const cold = [...transfers.values()];
      const total = cold.reduce((sum, t) => sum + t.bytes, 0);
      process.stdout.write(
        `Cold sign-in screen: ${kb(total)} over ${cold.length} responses\n` +
          cold.map((t) => `  ${kb(t.bytes).padStart(9)}  ${t.headers['content-encoding'] ?? '-'}  ${new URL(t.url).pathname}\n`).join(''),
      );

      const html = cold.find((t) => new URL(t.url).pathname === '/');
      expect(html?.headers['content-encoding']).toMatch(/^(br|gzip)$/);
      expect(html?.headers['cache-control']).toBe('no-cache');
      expect(html?.headers.etag).toMatch(/^(W\/)?"[^"]+"$/);

      const bundles = cold.filter((t) => /\/_expo\/static\/js\/.+\.js$/.test(new URL(t.url).pathname));
      expect(bundles.length).toBeGreaterThan(0);
      for (const bundle of bundles) {
        expect(bundle.headers['content-encoding'], bundle.url).toBe('br');
        expect(bundle.headers['cache-control'], bundle.url).toBe('public, max-age=31536000, immutable');
        expect(bundle.headers.vary, bundle.url).toMatch(/accept-encoding/i);
      }
      const hashedAssets = cold.filter((t) => /\/assets\/.+\.[0-9a-f]{16,}\.\w+$/.test(new URL(t.url).pathname));
      for (const asset of hashedAssets) expect(asset.headers['cache-control'], asset.url).toBe('public, max-age=31536000, immutable');

      // Signed in, the dive log's answer is the largest JSON of the screen.
      await page.getByTestId('sign-in-email').fill('biologist@bathynote.test');
      await page.getByTestId('sign-in-password').fill('bathynote-demo');
      await page.getByTestId('sign-in-password').press('Enter');
      await page.getByTestId('campaign-list').getByText('Varn Shoal 2026').click();
      const isLog = (url: string) => /^\/api\/dives\/[^/]+\/observations$/.test(new URL(url).pathname);
      const logAnswer = page.waitForResponse((r) => isLog(r.url()) && r.status() === 200);
      await page.getByTestId('dive-VS-01').click();
      await logAnswer;
      await page.getByTestId('dive-log').first().waitFor();
      const apiPaths = () => [...transfers.values()].filter((t) => t.url.includes('/api/')).map((t) => new URL(t.url).pathname);
      await expect.poll(() => [...transfers.values()].some((t) => isLog(t.url) && t.bytes > 0), { timeout: 5000 }).toBe(true);
      const log = [...transfers.values()].find((t) => isLog(t.url) && t.status === 200);
      expect(log, `the dive log was read among ${apiPaths().join(', ')}`).toBeDefined();
      expect(log?.mimeType).toBe('application/json');
      expect(log?.headers['content-encoding']).toMatch(/^(br|gzip)$/);
      const stream = [...transfers.values()].find((t) => new URL(t.url).pathname.endsWith('/stream'));
      if (stream) expect(stream.headers['content-encoding']).toBeUndefined();
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
