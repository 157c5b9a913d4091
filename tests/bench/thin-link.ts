/**
 * The app over a thin satellite link: Chromium with the DevTools protocol's network throttling
 * (96 kbit/s each way, 650 ms round trip) and, beside it, the same steps unthrottled. Bytes are
 * what crossed the wire (`encodedDataLength`); times are wall-clock on this machine.
 * Targets under the throttle: sign-in screen cold ≤ 30 s, dive log warm ≤ 3 s, a new entry on
 * screen ≤ 2 s after it was posted. Budgets on the wire: sign-in cold ≤ 300 KB, dive log cold
 * (after sign-in, everything) ≤ 450 KB, warm reload ≤ 20 KB plus changed data.
 */
import type { CDPSession, Page } from 'playwright-core';

import { ensureWebBuild } from '../../scripts/web-build';
import { openBrowser, viewports } from '../helpers/chromium';
import { apiSignIn } from '../helpers/e2e-fixtures';
import { startServerProcess } from '../helpers/server-process';

const THROTTLE = { offline: false, latency: 650, downloadThroughput: 96_000 / 8, uploadThroughput: 96_000 / 8 };

type Figures = {
  signInMs: number;
  signInBytes: number;
  logMs: number;
  logBytes: number;
  logEntries: number;
  warmMs: number;
  warmBytes: number;
  liveMs: number;
};

async function meter(page: Page, throttled: boolean): Promise<{ cdp: CDPSession; bytes: () => number }> {
  const cdp = await page.context().newCDPSession(page);
  let total = 0;
  cdp.on('Network.loadingFinished', (e) => (total += e.encodedDataLength));
  await cdp.send('Network.enable');
  if (throttled) await cdp.send('Network.emulateNetworkConditions', THROTTLE);
  // A cold visit counts every file the page asks for, even one the service worker (registered at
  // sign-in) already holds; the worker's own downloads are what it keeps for a reload with no link.
  await cdp.send('Network.setBypassServiceWorker', { bypass: true });
  return { cdp, bytes: () => total };
}

async function run(url: string, throttled: boolean): Promise<Figures> {
  const screen = await openBrowser(viewports.phone);
  const page = screen.page;
  page.setDefaultTimeout(180_000);
  try {
    const { cdp, bytes } = await meter(page, throttled);
    let t = Date.now();
    await page.goto(url, { waitUntil: 'commit' });
    await page.getByTestId('sign-in-email').waitFor();
    const signInMs = Date.now() - t;
    const signInBytes = bytes();

    t = Date.now();
    await page.getByTestId('sign-in-email').fill('guest@bathynote.test');
    await page.getByTestId('sign-in-password').fill('bathynote-demo');
    await page.getByTestId('sign-in-password').press('Enter');
    await page.getByTestId('campaign-list').getByText('Varn Shoal 2026').click();
    await page.getByTestId('dive-VS-01').click();
    const entries = page.getByTestId('dive-log').locator('[data-testid^="observation-"]');
    await entries.first().waitFor();
    // Fifty entries, or all the dive has when it has fewer.
    await page
      .waitForFunction(() => document.querySelectorAll('[data-testid="dive-log"] [data-testid^="observation-"]').length >= 50, undefined, {
        timeout: 5000,
      })
      .catch(() => undefined);
    const logMs = Date.now() - t;
    const logEntries = await entries.count();
    await page.waitForTimeout(2000);
    const logBytes = bytes();

    // The warm reload is served as a returning guest's would be: from the worker and the cache.
    await cdp.send('Network.setBypassServiceWorker', { bypass: false });
    const before = bytes();
    t = Date.now();
    await page.reload({ waitUntil: 'commit' });
    await entries.first().waitFor();
    const warmMs = Date.now() - t;
    await page.waitForTimeout(2000);
    const warmBytes = bytes() - before;

    const diveId = new URL(page.url()).pathname.split('/')[2] ?? '';
    const lead = await apiSignIn(url, 'lead@bathynote.test');
    await page.waitForTimeout(1000);
    const title = `Posted ashore-bound ${Date.now()}`;
    t = Date.now();
    await lead.call(`/api/dives/${diveId}/observations`, 'POST', { kind: 'operations', title });
    await page.getByTestId('dive-log').getByText(title).first().waitFor({ timeout: 60_000 });
    const liveMs = Date.now() - t;
    return { signInMs, signInBytes, logMs, logBytes, logEntries, warmMs, warmBytes, liveMs };
  } finally {
    await screen.close();
  }
}

const kb = (b: number) => `${(b / 1024).toFixed(1)} KB`;
const s = (ms: number) => `${(ms / 1000).toFixed(1)} s`;

export async function benchThinLink(): Promise<void> {
  await ensureWebBuild();
  // The demo as npm start serves it, watch plan included.
  const server = await startServerProcess({ BATHYNOTE_DEMO_WATCHES: '1' });
  try {
    const fast = await run(server.url, false);
    const slow = await run(server.url, true);
    const rows: [string, string, string, string][] = [
      ['sign-in screen, cold: time', s(slow.signInMs), s(fast.signInMs), '≤ 30 s'],
      ['sign-in screen, cold: bytes', kb(slow.signInBytes), kb(fast.signInBytes), '≤ 300 KB'],
      [`sign-in to dive log (${slow.logEntries} entries): time`, s(slow.logMs), s(fast.logMs), ''],
      ['dive log cold, all bytes from the first', kb(slow.logBytes), kb(fast.logBytes), '≤ 450 KB'],
      ['warm reload to the dive log: time', s(slow.warmMs), s(fast.warmMs), '≤ 3 s'],
      ['warm reload: bytes', kb(slow.warmBytes), kb(fast.warmBytes), '≤ 20 KB + changes'],
      ['entry posted to on screen', s(slow.liveMs), s(fast.liveMs), '≤ 2 s'],
    ];
    process.stdout.write(
      `${'figure'.padEnd(44)}${'96 kbit/s, 650 ms'.padStart(20)}${'unthrottled'.padStart(14)}${'target'.padStart(20)}\n`,
    );
    for (const [name, a, b, target] of rows)
      process.stdout.write(`${name.padEnd(44)}${a.padStart(20)}${b.padStart(14)}${target.padStart(20)}\n`);
  } finally {
    await server.stop();
  }
}
