/**
 * A scientist on board loses the ship's Wi-Fi: the app, reloaded with no link, still shows the
 * dive log as it last was and says since when; an entry written then waits on the device and is
 * sent when the link is back, where another member reads it through the API.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, signInAs, viewports } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, {
    campaignName: 'Offline write 2026',
    prefix: 'OW-',
    underWay: true,
    underWayEntries: true,
  });
});
afterAll(async () => {
  await server?.stop();
});

type LogPage = { items: { title: string; createdBy?: unknown }[] };

describe('writing with no link', () => {
  it('shows the kept dive log offline, keeps a new entry waiting, and sends it when the link is back', async () => {
    const screen = await openBrowser(viewports.phone);
    const { page, context } = screen;
    try {
      const dive = fixtures.underWay!;
      await signInAs(page, server.url, 'biologist@bathynote.test');
      await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
      await page.getByTestId(`dive-${dive.number}`).click();
      const entries = page.getByTestId('dive-log').locator('[data-testid^="observation-"]');
      await entries.first().waitFor();
      const before = await fixtures.as.archaeologist.call<LogPage>(`/api/dives/${dive.id}/observations?limit=100`);
      const seen = before.items[0]?.title ?? '';
      expect(seen).not.toBe('');
      // The offline copy of the app is in place and the dive log is kept on the device.
      await page.waitForFunction(() => navigator.serviceWorker?.controller !== null, undefined, { timeout: 30_000 });
      await page.waitForFunction((text) => (localStorage.getItem('bathynote.query-cache') ?? '').includes(text), seen);
      // The service worker has every screen's script, the entry form's too, before the link drops.
      await page.waitForFunction(
        async () => {
          const reg = await navigator.serviceWorker.getRegistration();
          return !!reg?.active && !reg.installing && !reg.waiting;
        },
        undefined,
        { timeout: 60_000 },
      );

      await context.setOffline(true);
      await page.reload();
      await page.getByTestId('dive-log').getByText(seen).first().waitFor();
      await expect.poll(() => page.getByTestId('offline-notice').innerText()).toMatch(/^offline — showing what was here at \d\d:\d\d UTC$/);

      const title = 'Written with the Wi-Fi down';
      await page.getByTestId('new-observation').click();
      await page.getByTestId('field-kind-biology').click();
      await page.getByTestId('field-title').fill(title);
      await page.getByTestId('save-observation').click();
      const pending = page.getByTestId('pending-entries');
      await pending.getByText(title).waitFor();
      // Nothing has reached the server while the link is down.
      await page.waitForTimeout(1000);
      const meanwhile = await fixtures.as.archaeologist.call<LogPage>(`/api/dives/${dive.id}/observations?limit=100`);
      expect(meanwhile.items.map((i) => i.title)).not.toContain(title);

      // The link is back: the entry goes out by itself, the notice goes, and another member reads it.
      await context.setOffline(false);
      await page.getByTestId('dive-log').locator('[data-testid^="observation-"]').getByText(title).waitFor({ timeout: 30_000 });
      await expect.poll(() => page.getByTestId('pending-entries').count(), { timeout: 15_000 }).toBe(0);
      await expect.poll(() => page.getByTestId('offline-notice').count()).toBe(0);
      const after = await fixtures.as.archaeologist.call<LogPage>(`/api/dives/${dive.id}/observations?limit=100`);
      expect(after.items.filter((i) => i.title === title)).toHaveLength(1);
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
