import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, fixtureQuickMarks, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
/**
 * A campaign of the tests' own, with a dive under way (its number in `live`) carrying twenty
 * entries, so the log is long enough to scroll, and a new entry's time is "now" there.
 */
let fixtures: E2eFixtures;
let live: string;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { underWay: true, underWayEntries: true });
  live = fixtures.underWay!.number;
});
afterAll(async () => {
  await server?.stop();
});

const signIn = (page: Page, email: string) => signInAs(page, server.url, email);

async function openDive(page: Page, number = live) {
  await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
  await page.getByTestId(`dive-${number}`).click();
  await page.getByTestId('live-status-live').waitFor();
}

async function logEntry(page: Page, title: string, time?: string) {
  await page.getByTestId('new-observation').click();
  await page.getByTestId('field-kind-biology').click();
  await page.getByTestId('field-title').fill(title);
  if (time) await page.getByTestId('field-time').fill(time);
  await page.getByTestId('save-observation').click();
  await page.getByTestId('dive-log').getByText(title).waitFor();
}

/** Scrolls the dive log like a reader's thumb would, away from the newest entries. */
async function scrollLogDown(page: Page) {
  await page.getByTestId('dive-log').first().hover();
  for (let i = 0; i < 4; i++) await page.mouse.wheel(0, 600);
  // Settled: the list stands still away from the top across two reads (the app hears of the
  // position through the list's throttled scroll events, at most 100 ms apart).
  const offset = () =>
    page.evaluate(() =>
      Math.max(...Array.from(document.querySelectorAll('[data-testid="dive-log"], [data-testid="dive-log"] *')).map((e) => e.scrollTop)),
    );
  let last = -1;
  await expect
    .poll(
      async () => {
        const [before, now] = [last, await offset()];
        last = now;
        return now > 0 && now === before;
      },
      { interval: 150, timeout: 5000 },
    )
    .toBe(true);
}

describe.each([
  ['phone', viewports.phone],
  ['wide', viewports.wide],
] as const)('two people on one dive at %s size', (size, viewport) => {
  let logger: Browser;
  let reader: Browser;
  beforeAll(async () => {
    [logger, reader] = await Promise.all([openBrowser(viewport), openBrowser(viewport)]);
    await Promise.all([signIn(logger.page, 'biologist@bathynote.test'), signIn(reader.page, 'guest@bathynote.test')]);
    await Promise.all([openDive(logger.page), openDive(reader.page)]);
  });
  afterAll(async () => {
    await Promise.all([logger?.close(), reader?.close()]);
  });

  it('shows an entry to the other reader without a reload', async () => {
    const title = `Squat lobster in the amphora mouth (${size})`;
    await logEntry(logger.page, title);
    await reader.page.getByTestId('dive-log').getByText(title).waitFor({ timeout: 5000 });
    expect(logger.errors).toEqual([]);
    expect(reader.errors).toEqual([]);
  });

  it('holds new entries behind a marker while the reader is scrolled down', async () => {
    await scrollLogDown(reader.page);
    const title = `Conger passing the stern (${size})`;
    // Newer than everything in the log, so it belongs at the very top.
    await logEntry(logger.page, title, '2026-12-31 23:59:00');
    const marker = reader.page.getByTestId('new-entries');
    await marker.waitFor({ timeout: 5000 });
    expect(await marker.textContent()).toContain('1 new entry');
    expect(await reader.page.getByTestId('dive-log').getByText(title).count()).toBe(0);
    await marker.click();
    await reader.page.getByTestId('dive-log').getByText(title).waitFor();
    expect(await marker.count()).toBe(0);
  });

  it('keeps an entry and the dive summary opened straight from a link up to date', async () => {
    const title = `Ling under the bow (${size})`;
    await logEntry(logger.page, title);
    const diveId = /\/dives\/([^/?#]+)/.exec(logger.page.url())![1]!;
    // The logger's own browser talks to the API as the app does (same origin, its session).
    const api = (path: string, method = 'GET', body?: unknown) =>
      logger.page.evaluate(
        async ({ path, method, body }) => {
          const res = await fetch(path, {
            method,
            headers: body ? { 'content-type': 'application/json' } : {},
            body: body ? JSON.stringify(body) : undefined,
          });
          return (await res.json()) as { id: string; version: number; items?: { id: string; title: string; version: number }[] };
        },
        { path, method, body },
      );
    const entry = (await api(`/api/dives/${diveId}/observations?limit=100`)).items!.find((i) => i.title === title)!;

    await reader.page.goto(`${server.url}/observations/${entry.id}`);
    const detail = reader.page.getByTestId('observation-detail');
    await detail.getByText(title).waitFor();
    await api(`/api/observations/${entry.id}`, 'PATCH', { version: entry.version, title: `${title}, two of them` });
    await detail.getByText(`${title}, two of them`).waitFor({ timeout: 5000 });

    await reader.page.goto(`${server.url}/dives/${diveId}/summary`);
    const count = reader.page.getByTestId('stat-entries');
    await count.waitFor();
    const before = Number(await count.textContent());
    await api(`/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title: `Second ling (${size})` });
    await expect.poll(async () => Number(await count.textContent()), { timeout: 5000 }).toBe(before + 1);
    expect(logger.errors).toEqual([]);
    expect(reader.errors).toEqual([]);
  });
});

describe('two people editing one entry', () => {
  it('shows the second editor both versions, and keeps every state in the history', async () => {
    const [author, lead] = await Promise.all([openBrowser(viewports.wide), openBrowser(viewports.wide)]);
    try {
      await Promise.all([signIn(author.page, 'biologist@bathynote.test'), signIn(lead.page, 'lead@bathynote.test')]);
      await openDive(author.page);
      const title = 'Sponge on the gudgeon';
      await logEntry(author.page, title);
      await author.page.getByTestId('dive-log').getByText(title).click();
      await author.page.getByTestId('edit').click();
      await author.page.getByTestId('observation-editor').waitFor();
      const editUrl = author.page.url();
      await author.page.getByTestId('field-title').fill('Glass sponge on the gudgeon');

      // Meanwhile the lead changes the same entry and saves first.
      await lead.page.goto(editUrl);
      await lead.page.getByTestId('observation-editor').waitFor();
      await lead.page.getByTestId('field-title').fill('Vase sponge on the gudgeon');
      await lead.page.getByTestId('save-observation').click();
      await lead.page.getByTestId('observation-detail').waitFor();

      // The author sees the other save as it happens (live), before saving over it: both versions,
      // field by field, and nothing overwritten.
      const conflictPanel = author.page.getByTestId('edit-conflict');
      await conflictPanel.waitFor();
      expect(await author.page.getByTestId('save-observation').count()).toBe(0);
      expect(await author.page.getByTestId('edit-conflict-theirs-title').textContent()).toBe('Vase sponge on the gudgeon');
      expect(await author.page.getByTestId('edit-conflict-mine-title').textContent()).toBe('Glass sponge on the gudgeon');
      await author.page.getByTestId('edit-conflict-keep-mine').click();
      await author.page.getByTestId('observation-detail').getByText('Glass sponge on the gudgeon').waitFor();

      await author.page.getByTestId('toggle-history').click();
      await author.page.getByTestId('revision-3').waitFor();
      expect(await author.page.getByTestId('revision-2').textContent()).toContain('Ada Lumen');
      expect(await author.page.getByTestId('revision-1').textContent()).toContain('Logged');
      expect(author.errors).toEqual([]);
      expect(lead.errors).toEqual([]);
    } finally {
      await Promise.all([author.close(), lead.close()]);
    }
  });
});

describe('logging fast and over a failing link', () => {
  it('logs with a quick mark the lead defined, in one tap', async () => {
    const lead = await openBrowser(viewports.phone);
    const bio = await openBrowser(viewports.phone);
    try {
      await signIn(lead.page, 'lead@bathynote.test');
      await lead.page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
      await lead.page.getByTestId('campaign-settings').click();
      // The campaign's own quick marks, drawn from data, mean the list is in before the form below it is used.
      await lead.page.getByTestId(`edit-quick-mark-${fixtureQuickMarks[0].label}`).waitFor();
      await lead.page.getByTestId('field-quick-mark-label').fill('Rusticle drip');
      await lead.page.getByTestId('add-quick-mark').click();
      await lead.page.getByTestId('quick-mark-settings').getByText('Rusticle drip').waitFor();
      // The lead changes it afterwards: a tag from the vocabulary, picked as on an entry.
      await lead.page.getByTestId('edit-quick-mark-Rusticle drip').click();
      expect(await lead.page.getByTestId('field-quick-mark-label').inputValue()).toBe('Rusticle drip');
      await lead.page.getByTestId('field-tag').fill('hu');
      await lead.page.getByTestId('field-tag').press('Enter');
      await lead.page.getByTestId('chosen-tag-hull').waitFor();
      await lead.page.getByTestId('add-quick-mark').click();
      await lead.page.getByTestId('quick-mark-settings').getByText('Rusticle drip · #hull').waitFor();

      await signIn(bio.page, 'biologist@bathynote.test');
      // Quick marks are offered on a dive under way.
      await openDive(bio.page);
      await bio.page.getByTestId('quick-mark-Rusticle drip').click();
      await bio.page.getByTestId('toast').getByText('Rusticle drip logged').waitFor();
      const logged = bio.page.getByTestId('dive-log').locator('[data-testid^="observation-"]').filter({ hasText: 'Rusticle drip' }).first();
      await logged.waitFor();
      await logged.getByText('#hull').waitFor();
      expect(bio.errors).toEqual([]);
    } finally {
      await Promise.all([lead.close(), bio.close()]);
    }
  });

  it('opens the live log again after the stream was refused on the way (a proxy error)', async () => {
    const [reader, logger] = await Promise.all([openBrowser(viewports.phone), openBrowser(viewports.phone)]);
    try {
      await Promise.all([signIn(reader.page, 'guest@bathynote.test'), signIn(logger.page, 'pilot@bathynote.test')]);
      // A proxy on the link answers the first attempt with an error page, which a browser's own
      // reconnecting gives up on for good.
      let refused = 0;
      await reader.page.route('**/api/dives/*/stream*', (route) => {
        if (refused++ > 0) return route.continue();
        return route.fulfill({ status: 502, contentType: 'text/html', body: '<h1>Bad gateway</h1>' });
      });
      await reader.page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
      await reader.page.getByTestId(`dive-${live}`).click();
      await reader.page.getByTestId('live-status-connecting').waitFor();
      await reader.page.getByTestId('live-status-live').waitFor({ timeout: 10_000 });
      expect(refused).toBe(2);

      await openDive(logger.page);
      await logEntry(logger.page, 'Logged after the proxy error');
      await reader.page.getByTestId('dive-log').getByText('Logged after the proxy error').waitFor({ timeout: 5000 });
      expect(reader.errors.filter((e) => !e.includes('502'))).toEqual([]);
    } finally {
      await Promise.all([reader.close(), logger.close()]);
    }
  });

  it('keeps an entry that could not be sent, shows it waiting, and sends it when the link is back', async () => {
    const bio = await openBrowser(viewports.phone);
    try {
      await signIn(bio.page, 'biologist@bathynote.test');
      await openDive(bio.page);
      // The satellite link drops: every new entry fails to reach the server.
      await bio.page.route('**/api/dives/*/observations', (route) =>
        route.request().method() === 'POST' ? route.abort('internetdisconnected') : route.continue(),
      );
      await bio.page.getByTestId('new-observation').click();
      await bio.page.getByTestId('field-kind-biology').click();
      await bio.page.getByTestId('field-title').fill('Sent over a dropping link');
      await bio.page.getByTestId('save-observation').click();
      const pending = bio.page.getByTestId('pending-entries');
      await pending.getByText('Sent over a dropping link').waitFor();
      await pending.getByText('Waiting to send').waitFor();

      // It survives a reload: it is kept on the device.
      await bio.page.reload();
      await bio.page.getByTestId('pending-entries').getByText('Sent over a dropping link').waitFor();

      // A second one, logged by mistake, its author throws away before the link is back.
      await bio.page.getByTestId('new-observation').click();
      await bio.page.getByTestId('field-kind-biology').click();
      await bio.page.getByTestId('field-title').fill('Logged twice by mistake');
      await bio.page.getByTestId('save-observation').click();
      const mistake = bio.page.locator('[data-testid^="pending-"]').filter({ hasText: 'Logged twice by mistake' }).last();
      await mistake.getByTestId('pending-discard').click();
      await expect.poll(() => bio.page.getByTestId('pending-entries').getByText('Logged twice by mistake').count()).toBe(0);

      await bio.page.unroute('**/api/dives/*/observations');
      await bio.page.getByTestId('pending-retry').click();
      await bio.page.getByTestId('dive-log').locator('[data-testid^="observation-"]').getByText('Sent over a dropping link').waitFor();
      expect(await bio.page.getByTestId('pending-entries').count()).toBe(0);
      await bio.page.reload();
      await bio.page.getByTestId('dive-log').getByText('Sent over a dropping link').waitFor();
      expect(await bio.page.getByTestId('dive-log').getByText('Logged twice by mistake').count()).toBe(0);
      expect(bio.errors).toEqual([]);
    } finally {
      await bio.close();
    }
  });

  it('keeps a waiting entry and a half-typed draft to their author when the next person signs in on the same screen', async () => {
    const screen = await openBrowser(viewports.phone);
    const page = screen.page;
    const signOut = async () => {
      await page.goto(`${server.url}/account`);
      await page.getByTestId('sign-out').click();
      await page.getByTestId('sign-in-email').waitFor();
    };
    const posts = (route: string) =>
      page.route(route, (r) => (r.request().method() === 'POST' ? r.abort('internetdisconnected') : r.continue()));
    try {
      await signIn(page, 'biologist@bathynote.test');
      await openDive(page);
      await posts('**/api/dives/*/observations');
      await page.getByTestId('new-observation').click();
      await page.getByTestId('field-kind-biology').click();
      await page.getByTestId('field-title').fill('Written by the biologist, not sent yet');
      await page.getByTestId('save-observation').click();
      await page.getByTestId('pending-entries').getByText('Written by the biologist, not sent yet').waitFor();
      await page.getByTestId('new-observation').click();
      await page.getByTestId('field-title').fill('Half-typed by the biologist');
      // The draft is kept a moment after the last key: wait until it is in the browser's storage.
      await page.waitForFunction((text) => Object.values(localStorage).some((v) => v.includes(text)), 'Half-typed by the biologist');
      await signOut();
      await page.unroute('**/api/dives/*/observations');

      // The archaeologist signs in on the same screen, with the link back.
      await signIn(page, 'archaeologist@bathynote.test');
      await openDive(page);
      expect(await page.getByTestId('pending-entries').count()).toBe(0);
      await page.getByTestId('new-observation').click();
      expect(await page.getByTestId('field-title').inputValue()).toBe('');
      // An entry of the archaeologist's own, queued behind the biologist's: the send queue goes
      // through its entries oldest first, so once this one has arrived the biologist's has been
      // passed over, not merely not reached yet.
      await posts('**/api/dives/*/observations');
      await page.getByTestId('field-kind-biology').click();
      await page.getByTestId('field-title').fill('Queued by the archaeologist');
      await page.getByTestId('save-observation').click();
      await page.getByTestId('pending-entries').getByText('Queued by the archaeologist').waitFor();
      await page.unroute('**/api/dives/*/observations');
      await page.evaluate(() => window.dispatchEvent(new Event('online')));
      await page.getByTestId('dive-log').locator('[data-testid^="observation-"]').getByText('Queued by the archaeologist').waitFor();
      expect(await page.getByTestId('pending-entries').count()).toBe(0);
      const titles = await page.evaluate(
        async (diveUrl) => {
          const res = await fetch(`${diveUrl}/observations?limit=100`);
          return ((await res.json()) as { items: { title: string }[] }).items.map((i) => i.title);
        },
        `/api/dives/${/\/dives\/([^/?#]+)/.exec(page.url())![1]}`,
      );
      expect(titles).toContain('Queued by the archaeologist');
      expect(titles).not.toContain('Written by the biologist, not sent yet');
      await signOut();

      // Back with its author, it is waiting, and goes out in her name.
      await signIn(page, 'biologist@bathynote.test');
      await openDive(page);
      const log = page.getByTestId('dive-log').locator('[data-testid^="observation-"]');
      await log.getByText('Written by the biologist, not sent yet').waitFor();
      await page.getByTestId('new-observation').click();
      expect(await page.getByTestId('field-title').inputValue()).toBe('Half-typed by the biologist');
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});

describe('a member taken off the campaign while following a dive', () => {
  it('sees the live log stop ("Not live") rather than reconnect for ever', async () => {
    const [guest, lead] = await Promise.all([openBrowser(viewports.phone), openBrowser(viewports.phone)]);
    try {
      // The guest's page runs on a clock the test can move on, to see what it would do later.
      await guest.page.clock.install();
      const streamsOpened: string[] = [];
      guest.page.on('request', (r) => {
        if (r.url().includes('/stream')) streamsOpened.push(r.url());
      });
      await Promise.all([signIn(guest.page, 'guest@bathynote.test'), signIn(lead.page, 'lead@bathynote.test')]);
      await openDive(guest.page);
      const diveId = /\/dives\/([^/?#]+)/.exec(guest.page.url())![1]!;
      // The lead removes the guest, through the API as the team screen does.
      const removed = await lead.page.evaluate(async (diveId) => {
        const dive = (await (await fetch(`/api/dives/${diveId}`)).json()) as { campaignId: string };
        const members = (await (await fetch(`/api/campaigns/${dive.campaignId}/members`)).json()) as { userId: string; email: string }[];
        const guestId = members.find((m) => m.email === 'guest@bathynote.test')!.userId;
        return (await fetch(`/api/campaigns/${dive.campaignId}/members/${guestId}`, { method: 'DELETE' })).status;
      }, diveId);
      expect(removed).toBeLessThan(300);
      await guest.page.getByTestId('live-status-offline').waitFor({ timeout: 15_000 });
      // And it stays so: an hour of the page's timers later (past every retry delay, at most a
      // minute), no attempt against a dive the guest may no longer see.
      const opened = streamsOpened.length;
      await guest.page.clock.runFor('01:00:00');
      // A request sent after the timers ran is seen after any they sent: then the count is final.
      const marker = guest.page.waitForRequest((r) => r.url().endsWith('/api/health'));
      await guest.page.evaluate(() => void fetch('/api/health'));
      await marker;
      expect(streamsOpened.length).toBe(opened);
      expect(await guest.page.getByTestId('live-status-offline').count()).toBe(1);
    } finally {
      await Promise.all([guest.close(), lead.close()]);
    }
  });
});
