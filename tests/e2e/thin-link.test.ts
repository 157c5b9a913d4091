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
  // Every file the page asks for crosses the link here, even once the service worker has a copy.
  await cdp.send('Network.setBypassServiceWorker', { bypass: true });
  return { transfers, cdp };
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;
const KB = 1024;

/**
 * What a cold visit may move over the link: the sign-in screen, then the dive log after signing
 * in (all of it, API included). The service worker's own downloads of the rest of the app, which
 * follow behind the dive log, are not counted: they are what the app kept for a reload with no link.
 */
const BUDGET = { signIn: 300 * KB, diveLog: 450 * KB };

function report(title: string, transfers: Transfer[]): number {
  const total = transfers.reduce((sum, t) => sum + t.bytes, 0);
  process.stdout.write(
    `${title}: ${kb(total)} over ${transfers.length} responses\n` +
      transfers.map((t) => `  ${kb(t.bytes).padStart(9)}  ${t.headers['content-encoding'] ?? '-'}  ${new URL(t.url).pathname}\n`).join(''),
  );
  return total;
}

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
      const signInTotal = report('Cold sign-in screen', cold);
      expect(signInTotal, 'bytes for the sign-in screen, cold').toBeLessThanOrEqual(BUDGET.signIn);
      // The sign-in screen draws in the device's own fonts: the app's faces come after sign-in.
      expect(cold.filter((t) => t.url.includes('/fonts/')).map((t) => t.url)).toEqual([]);

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
      // Everything the log's first screen asked for has arrived once the network has been quiet a moment.
      await expect
        .poll(
          async () => {
            const before = [...transfers.values()].reduce((sum, t) => sum + t.bytes, 0);
            await page.waitForTimeout(750);
            return [...transfers.values()].reduce((sum, t) => sum + t.bytes, 0) - before;
          },
          { timeout: 15_000 },
        )
        .toBe(0);
      // Signed in, the app's own faces come, as WOFF2.
      const faces = [...transfers.values()].filter((t) => t.url.includes('/fonts/'));
      expect(faces.length).toBeGreaterThan(0);
      for (const font of faces) expect(new URL(font.url).pathname).toMatch(/\.woff2$/);
      const diveLogTotal = report('Cold dive log after signing in (from the first byte)', [...transfers.values()]);
      expect(diveLogTotal, 'bytes for the sign-in screen and the dive log, cold').toBeLessThanOrEqual(BUDGET.diveLog);
      const stream = [...transfers.values()].find((t) => new URL(t.url).pathname.endsWith('/stream'));
      if (stream) expect(stream.headers['content-encoding']).toBeUndefined();
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });

  it('opens with no link after one visit, says since when, and forgets it all on sign-out', async () => {
    const screen = await openBrowser(viewports.phone);
    const page = screen.page;
    try {
      await page.goto(server.url);
      await page.getByTestId('sign-in-email').fill('biologist@bathynote.test');
      await page.getByTestId('sign-in-password').fill('bathynote-demo');
      await page.getByTestId('sign-in-password').press('Enter');
      await page.getByTestId('campaign-list').getByText('Varn Shoal 2026').click();
      await page.getByTestId('dive-VS-01').click();
      const entries = page.getByTestId('dive-log').locator('[data-testid^="observation-"]');
      await entries.first().waitFor();
      const diveId = new URL(page.url()).pathname.split('/')[2] ?? '';
      const seen = await page.evaluate(async (id) => {
        const res = await fetch(`/api/dives/${id}/observations?limit=1`);
        const body = (await res.json()) as { items: { title: string }[] };
        return body.items[0]?.title ?? '';
      }, diveId);
      expect(seen).not.toBe('');
      // The app shell is kept by the service worker, the dive log by the persisted cache.
      await page.waitForFunction(() => navigator.serviceWorker?.controller !== null, undefined, { timeout: 15_000 });
      await page.waitForFunction((text) => (localStorage.getItem('bathynote.query-cache') ?? '').includes(text), seen);

      await screen.context.setOffline(true);
      await page.reload();
      await page.getByTestId('dive-log').getByText(seen).first().waitFor();
      await expect.poll(() => page.getByTestId('offline-notice').innerText()).toMatch(/^offline — showing what was here at \d\d:\d\d UTC$/);

      await screen.context.setOffline(false);
      await expect.poll(() => page.getByTestId('offline-notice').count()).toBe(0);

      await page.goto(`${server.url}/account`);
      await page.getByTestId('sign-out').click();
      await page.getByTestId('sign-in-email').waitFor();
      await expect.poll(() => page.evaluate(() => localStorage.getItem('bathynote.query-cache') ?? '')).not.toContain(seen);

      // Someone else on the same device: none of the biologist's dive log comes back, online or not.
      await page.getByTestId('sign-in-email').fill('outsider@bathynote.test');
      await page.getByTestId('sign-in-password').fill('bathynote-demo');
      await page.getByTestId('sign-in-password').press('Enter');
      await page.getByText('No campaigns yet').waitFor();
      await page.waitForFunction(() => (localStorage.getItem('bathynote.query-cache') ?? '').includes('outsider@bathynote.test'));
      await page.waitForTimeout(1500);
      await screen.context.setOffline(true);
      await page.reload();
      await page.getByText('No campaigns yet').waitFor();
      expect(await page.getByText('Varn Shoal 2026').count()).toBe(0);
      expect(await page.getByText(seen).count()).toBe(0);
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
