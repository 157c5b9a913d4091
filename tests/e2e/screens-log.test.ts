/**
 * The dive log as people see it on a phone (390×844) and a wide screen (1440×900), in the light
 * and the dark theme: screenshots for a person to look at, and the layout rules checked by
 * measuring the rendered elements. The test makes its own campaign and dives through the API, so
 * the demo's content may change freely.
 */
import { mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { emails } from '../helpers/demo';
import { choose } from '../helpers/e2e-fixtures';
import { overlaps, textPastEdges, type Box } from '../helpers/layout';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

const shots = path.join(tmpdir(), 'bathynote-screens');

/* ---- the test's own campaign, made through the API ---- */

type Session = { call: <T>(p: string, method?: string, body?: unknown) => Promise<T> };

async function apiSession(url: string, email: string): Promise<Session> {
  const res = await fetch(`${url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: url },
    body: JSON.stringify({ email, password: 'bathynote-demo' }),
  });
  if (!res.ok) throw new Error(`sign-in as ${email}: ${res.status}`);
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0]!)
    .join('; ');
  return {
    call: async <T>(p: string, method = 'GET', body?: unknown) => {
      const r = await fetch(`${url}${p}`, {
        method,
        headers: { cookie, origin: url, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const text = await r.text();
      if (!r.ok) throw new Error(`${method} ${p}: ${r.status} ${text}`);
      return (text ? JSON.parse(text) : undefined) as T;
    },
  };
}

const campaignName = 'Screens check campaign, north slope';
/** Long titles on purpose: a card or a table row must show them whole or wrap them, never cut them at a few words. */
const titles = [
  'Collapsed timber frames with concretion along the port side',
  'Amphora neck protruding from the sediment near the stern post',
  'Dense white microbial mat covering the lower hull plating',
  'Current picks up from the north-east, vehicle holding station',
  'Sponge cluster on the sternpost with small fish sheltering',
  'Stack of coarse ware bowls, rims up, partly buried',
  'Laser scaler checked against the reference bar',
  'Push core taken through the mat at the rudder',
];
const marks = ['Microbial mat', 'Coral', 'Fish', 'Amphora', 'Sample taken', 'Position fix lost', 'Hull timber'];

type Made = { campaign: string; live: string; liveNumber: string; ended: string };

async function makeCampaign(url: string): Promise<Made> {
  const admin = await apiSession(url, emails.admin);
  const lead = await apiSession(url, emails.lead);
  const campaign = await admin.call<{ id: string }>('/api/campaigns', 'POST', {
    name: campaignName,
    siteName: 'North slope test site',
    datumLat: 36.2,
    datumLon: -7.5,
    leadEmail: emails.lead,
  });
  for (const [i, label] of marks.entries())
    await lead.call(`/api/campaigns/${campaign.id}/quick-marks`, 'POST', { label, kind: i === 3 || i === 6 ? 'archaeology' : 'biology' });
  // A dive under way: launched an hour ago, on the bottom since forty minutes.
  const liveNumber = 'NS-07';
  const live = await lead.call<{ id: string }>(`/api/campaigns/${campaign.id}/dives`, 'POST', {
    number: liveNumber,
    objectives: 'Check the screens on a dive under way.',
  });
  const now = Date.now();
  await lead.call(`/api/dives/${live.id}/phases`, 'POST', { phase: 'launch', at: new Date(now - 60 * 60_000).toISOString() });
  await lead.call(`/api/dives/${live.id}/phases`, 'POST', { phase: 'on-bottom', at: new Date(now - 40 * 60_000).toISOString() });
  for (const [i, title] of titles.entries())
    await lead.call(`/api/dives/${live.id}/observations`, 'POST', {
      kind: (['biology', 'archaeology', 'environment', 'operations'] as const)[i % 4],
      title,
      observedAt: new Date(now - (35 - i * 4) * 60_000).toISOString(),
      depth: 590 + i * 1.7,
      lat: 36.2 + i * 1e-5,
      lon: -7.5 - i * 1e-5,
    });
  // A finished dive, yesterday.
  const ended = await lead.call<{ id: string }>(`/api/campaigns/${campaign.id}/dives`, 'POST', { number: 'NS-06' });
  const day = now - 24 * 3600_000;
  for (const [phase, minutes] of [
    ['launch', 0],
    ['on-bottom', 30],
    ['off-bottom', 200],
    ['on-deck', 230],
  ] as const)
    await lead.call(`/api/dives/${ended.id}/phases`, 'POST', { phase, at: new Date(day + minutes * 60_000).toISOString() });
  await lead.call(`/api/dives/${ended.id}/observations`, 'POST', {
    kind: 'biology',
    title: titles[0],
    observedAt: new Date(day + 60 * 60_000).toISOString(),
  });
  return { campaign: campaign.id, live: live.id, liveNumber, ended: ended.id };
}

/* ---- measuring ---- */

async function box(page: Page, testId: string): Promise<Box> {
  const b = await page.getByTestId(testId).first().boundingBox();
  if (!b) throw new Error(`${testId} is not on screen`);
  return b;
}

/** The boxes of the text lines inside the elements a selector finds. */
function textBoxes(page: Page, selector: string): Promise<Box[]> {
  return page.evaluate((sel) => {
    const out: { x: number; y: number; width: number; height: number }[] = [];
    for (const el of Array.from(document.querySelectorAll(sel))) {
      const walker = document.createTreeWalker(el, NodeFilter.SHOW_TEXT);
      for (let n = walker.nextNode(); n; n = walker.nextNode()) {
        if (!n.textContent?.trim()) continue;
        const range = document.createRange();
        range.selectNodeContents(n);
        for (const r of Array.from(range.getClientRects())) if (r.width > 0) out.push({ x: r.x, y: r.y, width: r.width, height: r.height });
      }
    }
    return out;
  }, selector);
}

/** Whether an element's text is cut off (drawn wider or taller than its box, as an ellipsis does). */
function truncated(page: Page, testId: string): Promise<boolean> {
  return page
    .getByTestId(testId)
    .first()
    .evaluate((el) => el.scrollWidth > el.clientWidth + 1 || el.scrollHeight > el.clientHeight + 1);
}

/**
 * WCAG 2.1 contrast ratio of two sRGB colours: relative luminance with the sRGB transfer function,
 * then (L1 + 0.05) / (L2 + 0.05). Source: W3C, Web Content Accessibility Guidelines 2.1 (2018),
 * definitions of "relative luminance" and "contrast ratio".
 */
function contrastRatio(a: [number, number, number], b: [number, number, number]): number {
  const lum = ([r, g, b]: [number, number, number]) => {
    const c = (v: number) => {
      const s = v / 255;
      return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
    };
    return 0.2126 * c(r) + 0.7152 * c(g) + 0.0722 * c(b);
  };
  const [hi, lo] = [lum(a), lum(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
}

/** The rendered colour of a text and of the nearest opaque background behind it. */
function renderedColours(page: Page, testId: string): Promise<{ fg: string; bg: string }> {
  return page
    .getByTestId(testId)
    .first()
    .evaluate((el) => {
      const textEl = el.querySelector<HTMLElement>('div[dir], span') ?? el;
      const fg = getComputedStyle(textEl).color;
      let bg = 'rgb(255, 255, 255)';
      for (let n: Element | null = el; n; n = n.parentElement) {
        const c = getComputedStyle(n).backgroundColor;
        if (c && c !== 'transparent' && !/rgba\(.*,\s*0\)$/.test(c)) {
          bg = c;
          break;
        }
      }
      return { fg, bg };
    });
}

const rgb = (css: string): [number, number, number] => {
  const m = /rgba?\((\d+),\s*(\d+),\s*(\d+)/.exec(css);
  if (!m) throw new Error(`not an rgb colour: ${css}`);
  return [Number(m[1]), Number(m[2]), Number(m[3])];
};

/* ---- the screens ---- */

let server: ServerProcess;
let made: Made;

beforeAll(async () => {
  mkdirSync(shots, { recursive: true });
  server = await startServerProcess();
  made = await makeCampaign(server.url);
});
afterAll(async () => {
  await server?.stop();
});

it('computes contrast as WCAG 2.1 defines it', () => {
  // W3C, WCAG 2.1 (2018), "contrast ratio": black on white is 21:1, a colour on itself 1:1.
  expect(contrastRatio([0, 0, 0], [255, 255, 255])).toBeCloseTo(21, 5);
  expect(contrastRatio([119, 119, 119], [119, 119, 119])).toBe(1);
  // #767676 on white is the well-known lightest grey that passes 4.5:1 (WebAIM contrast checker, from memory: 4.54:1).
  expect(contrastRatio([0x76, 0x76, 0x76], [255, 255, 255])).toBeCloseTo(4.54, 2);
});

async function openLog(page: Page, diveId: string) {
  await page.goto(`${server.url}/dives/${diveId}`);
  await page.getByTestId('dive-log').locator('[data-testid^="observation-"]').first().waitFor();
}

for (const scheme of ['light', 'dark'] as const) {
  describe(`phone, ${scheme}`, () => {
    let b: Browser;
    beforeAll(async () => {
      b = await openBrowser(viewports.phone);
      await b.page.emulateMedia({ colorScheme: scheme });
      await signInAs(b.page, server.url, emails.lead);
    });
    afterAll(async () => {
      await b?.close();
    });

    it('keeps the entry button, the quick marks and the header clear of each other and of the entries', async () => {
      const { page } = b;
      await openLog(page, made.live);
      await page.getByTestId('quick-marks').waitFor();
      await page.screenshot({ path: path.join(shots, `log-phone-${scheme}.png`) });
      const window = page.viewportSize()!;

      expect(await textPastEdges(page)).toEqual([]);

      // The entry button sits under the list, never over an entry's words, at rest or scrolled.
      const plus = await box(page, 'new-observation');
      expect(plus.width).toBeGreaterThanOrEqual(44);
      expect(plus.y + plus.height).toBeLessThanOrEqual(window.height);
      const entryText = '[data-testid="dive-log"] [data-testid^="observation-"][role="link"]';
      // Only what the list draws counts: text past its edge is clipped away.
      const drawn = await box(page, 'dive-log');
      for (const t of await textBoxes(page, entryText)) if (overlaps(t, drawn)) expect(overlaps(t, plus)).toBe(false);
      await page.getByTestId('dive-log').hover();
      await page.mouse.wheel(0, 400);
      await page.waitForTimeout(300);
      const shown = await box(page, 'dive-log');
      const plusNow = await box(page, 'new-observation');
      for (const t of await textBoxes(page, entryText)) if (overlaps(t, shown)) expect(overlaps(t, plusNow)).toBe(false);

      // Every quick mark is in sight (the list scrolled, they stay), or the bar says more are below.
      const more = await page.getByTestId('quick-marks-more').count();
      if (more === 0) {
        for (const label of marks) {
          const m = await box(page, `quick-mark-${label}`);
          expect(m.x).toBeGreaterThanOrEqual(0);
          expect(m.x + m.width).toBeLessThanOrEqual(window.width);
          expect(m.y + m.height).toBeLessThanOrEqual(window.height);
          expect(overlaps(m, plus)).toBe(false);
        }
      }

      // The header: the dive's number and campaign whole, the back control labelled and big enough.
      expect(await page.getByTestId('screen-title').textContent()).toBe(`Dive ${made.liveNumber}`);
      expect(await page.getByTestId('screen-subtitle').textContent()).toContain(campaignName);
      expect(await truncated(page, 'screen-title')).toBe(false);
      expect(await truncated(page, 'screen-subtitle')).toBe(false);
      const back = await box(page, 'back');
      expect(back.width).toBeGreaterThanOrEqual(44);
      expect(back.height).toBeGreaterThanOrEqual(44);
      expect(await page.getByTestId('back').textContent()).toContain('Campaign');
      // The lead runs the dive: its settings are a tap away.
      await page.getByTestId('dive-settings').waitFor();
    });

    it('shows a tapped mark’s notice above the entry button, its actions readable', async () => {
      const { page } = b;
      await page.getByTestId('quick-mark-Coral').click();
      const toast = page.getByTestId('toast');
      await toast.getByText('Coral logged').waitFor();
      await page.screenshot({ path: path.join(shots, `toast-phone-${scheme}.png`) });
      expect(overlaps(await box(page, 'toast'), await box(page, 'new-observation'))).toBe(false);
      for (const id of ['toast-undo', 'toast-action']) {
        const { fg, bg } = await renderedColours(page, id);
        expect(contrastRatio(rgb(fg), rgb(bg)), `${id} ${fg} on ${bg}`).toBeGreaterThanOrEqual(4.5);
        const a = await box(page, id);
        expect(a.height).toBeGreaterThanOrEqual(44);
      }
      await toast.getByTestId('toast-undo').click();
    });

    it('takes the "no link" notice away as soon as the kept entry is sent', async () => {
      const { page } = b;
      const refuse = '**/api/dives/*/observations';
      await page.route(refuse, (route) => (route.request().method() === 'POST' ? route.abort() : route.continue()));
      await page.getByTestId('quick-mark-Fish').click();
      const notice = page.getByTestId('toast').getByText('no link', { exact: false });
      await notice.waitFor();
      const shownAt = Date.now();
      await page.unroute(refuse);
      // The link is back: the app sends what it kept, and the notice goes with it (well before its usual 8 s).
      await page.evaluate(() => window.dispatchEvent(new Event('online')));
      await expect.poll(() => notice.count(), { timeout: 4000 }).toBe(0);
      expect(Date.now() - shownAt).toBeLessThan(6000);
      await page.getByTestId('dive-log').getByText('Fish', { exact: true }).first().waitFor();
    });

    it('wraps the filter rows so every choice is on screen', async () => {
      const { page } = b;
      await page.getByTestId('toggle-filters').click();
      await page.getByTestId('log-filters').waitFor();
      await page.screenshot({ path: path.join(shots, `filters-phone-${scheme}.png`) });
      const window = page.viewportSize()!;
      for (const chip of await page.getByTestId('log-filters').getByRole('checkbox').all()) {
        const c = (await chip.boundingBox())!;
        expect(c.x).toBeGreaterThanOrEqual(0);
        expect(c.x + c.width).toBeLessThanOrEqual(window.width);
      }
      expect(await textPastEdges(page)).toEqual([]);
      await page.getByTestId('toggle-filters').click();
    });

    it('keeps the dive number and the campaign readable while the live link reconnects', async () => {
      const { page } = b;
      await page.route('**/stream*', (route) => route.abort());
      await openLog(page, made.live);
      await page
        .locator('[data-testid="live-status-connecting"], [data-testid="live-status-offline"]')
        .first()
        .waitFor({ timeout: 20_000 });
      await page.screenshot({ path: path.join(shots, `reconnecting-phone-${scheme}.png`) });
      expect(await truncated(page, 'screen-title')).toBe(false);
      expect(await truncated(page, 'screen-subtitle')).toBe(false);
      // The connection state has a line of its own, under the titles.
      const subtitle = await box(page, 'screen-subtitle');
      const status = await box(page, 'live-status');
      expect(status.y).toBeGreaterThanOrEqual(subtitle.y + subtitle.height - 0.5);
      await page.unroute('**/stream*');
    });

    it('hides the quick marks once the dive is on deck, and says it is logged from video', async () => {
      const { page } = b;
      await openLog(page, made.ended);
      await page.getByTestId('dive-ended').waitFor();
      expect(await page.getByTestId('quick-marks').count()).toBe(0);
      await page.screenshot({ path: path.join(shots, `ended-phone-${scheme}.png`) });
      expect(await textPastEdges(page)).toEqual([]);
    });

    it('keeps the navigation on a page that does not exist', async () => {
      const { page } = b;
      await page.goto(`${server.url}/no/such/page`);
      await page.getByTestId('not-found').waitFor();
      await page.getByTestId('nav-campaigns').waitFor();
      expect(b.errors).toEqual([]);
    });
  });

  describe(`wide, ${scheme}`, () => {
    let b: Browser;
    beforeAll(async () => {
      b = await openBrowser(viewports.wide);
      await b.page.emulateMedia({ colorScheme: scheme });
      await signInAs(b.page, server.url, emails.lead);
    });
    afterAll(async () => {
      await b?.close();
    });

    it('gives the list at least 560 px and the detail the rest, with a divider to drag and a way to hide the detail', async () => {
      const { page } = b;
      await openLog(page, made.live);
      await page
        .getByTestId('dive-log')
        .getByText(titles[titles.length - 1]!)
        .click();
      await page.getByTestId('observation-detail').waitFor();
      await page.screenshot({ path: path.join(shots, `log-wide-${scheme}.png`) });
      expect(await textPastEdges(page)).toEqual([]);
      const list = await box(page, 'list-pane');
      const detail = await box(page, 'detail-pane');
      expect(list.width).toBeGreaterThanOrEqual(560);
      expect(overlaps(list, detail)).toBe(false);
      // The two panes fill the width beside the navigation.
      expect(detail.x + detail.width).toBeGreaterThan(page.viewportSize()!.width - 2);

      const divider = await box(page, 'split-divider');
      await page.mouse.move(divider.x + divider.width / 2, divider.y + 200);
      await page.mouse.down();
      await page.mouse.move(divider.x + divider.width / 2 + 120, divider.y + 200, { steps: 6 });
      await page.mouse.up();
      await expect.poll(async () => Math.round((await box(page, 'list-pane')).width)).toBeGreaterThan(list.width + 100);

      await page.getByTestId('toggle-detail').click();
      await expect.poll(() => page.getByTestId('detail-pane').count()).toBe(0);
      await page.getByTestId('toggle-detail').click();
      await page.getByTestId('detail-pane').waitFor();
      // The header keeps its words whole.
      expect(await truncated(page, 'screen-title')).toBe(false);
      expect(await truncated(page, 'screen-subtitle')).toBe(false);
    });

    it('lines the table up: one-line headers, a date column, titles on two lines, and columns of one’s own choosing that stay chosen', async () => {
      const { page } = b;
      await page.getByTestId('log-view-table').click();
      await page.getByTestId('log-table-header').waitFor();
      await page.getByTestId('column-date').waitFor();
      for (const id of ['date', 'time', 'kind', 'title', 'depth', 'author']) expect(await truncated(page, `column-${id}`), id).toBe(false);
      // The log's tools are one bar: the view switch sits in line with the search.
      const search = await box(page, 'log-search');
      const views = await box(page, 'log-view');
      expect(Math.abs(search.y + search.height / 2 - (views.y + views.height / 2))).toBeLessThan(8);

      // A long title wraps to a second line rather than stopping short.
      const row = page
        .getByTestId('dive-log')
        .locator('[role="row"]')
        .filter({ hasText: titles[0]!.slice(0, 20) })
        .first();
      const title = row.getByTestId('observation-title');
      expect(await title.textContent()).toContain(titles[0]);
      expect((await title.boundingBox())!.height).toBeGreaterThan(30);

      await page.getByTestId('toggle-columns').click();
      await page.getByTestId('column-toggle-position').click();
      await page.getByTestId('column-toggle-find').click();
      await page.getByTestId('column-position').waitFor();
      await page.screenshot({ path: path.join(shots, `table-wide-${scheme}.png`) });
      expect(await textPastEdges(page)).toEqual([]);
      for (const id of ['position', 'find']) expect(await truncated(page, `column-${id}`), id).toBe(false);

      // Remembered for this person after a reload.
      await page.reload();
      // The log's rows, drawn from data, mean the screen is live before the view is switched.
      await page.getByTestId('dive-log').locator('[data-testid^="observation-"]').first().waitFor();
      await choose(page.getByTestId('log-view-table'));
      await page.getByTestId('column-position').waitFor();
      expect(await page.getByTestId('column-find').count()).toBe(1);
      expect(await page.getByTestId('column-temperature').count()).toBe(0);
      await page.getByTestId('toggle-columns').click();
      await page.getByTestId('column-toggle-position').click();
      await page.getByTestId('column-toggle-find').click();
      await expect.poll(() => page.getByTestId('column-position').count()).toBe(0);
      expect(b.errors).toEqual([]);
    });
  });
}
