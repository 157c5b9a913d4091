/**
 * The record's screens at phone size (light theme) and wide (dark), held to layout rules by measuring
 * the rendered elements: gallery thumbnails keep their photo's aspect ratio, the site plan's track
 * stays inside its frame and its labels do not overlap, the dive settings open for the lead and the
 * pilot only, and an entry logged months after its dive is warned about, listed apart on the
 * summary, and leaves the depth profile's time axis at the dive's scale. The dive, its log, entries
 * and photos are made through the API for this test; no demo entry is used.
 */
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';

import { openBrowser, signInAs, viewports } from '../helpers/chromium';
import { emails } from '../helpers/demo';
import { choose } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let diveId: string;
let campaignId: string;
/** A biology entry with no name yet and an entry of the lead's, both of the test's dive. */
let unnamedId: string;
let leadEntryId: string;
const diveNumber = 'SR-01';
/** Photo id → its pixel size, as uploaded. */
const photoSizes = new Map<string, { width: number; height: number }>();

type Session = <T = unknown>(path: string, method?: string, body?: unknown) => Promise<T>;

/** A person's own API session outside the browser (password sign-in, then their cookie and our origin on every call). */
async function apiAs(email: string): Promise<Session> {
  const res = await fetch(`${server.url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: server.url },
    body: JSON.stringify({ email, password: 'bathynote-demo' }),
  });
  if (!res.ok) throw new Error(`sign-in ${email}: ${res.status}`);
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0]!)
    .join('; ');
  return async <T>(path: string, method = 'GET', body?: unknown) => {
    const form = body instanceof FormData;
    const r = await fetch(`${server.url}${path}`, {
      method,
      headers: { cookie, origin: server.url, ...(body && !form ? { 'content-type': 'application/json' } : {}) },
      body: form ? body : body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await r.text();
    if (!r.ok) throw new Error(`${method} ${path} as ${email}: ${r.status} ${text}`);
    return (text ? JSON.parse(text) : undefined) as T;
  };
}

const at = (hhmmss: string) => `2026-05-13T${hhmmss}.000Z`;
const phases = { launch: at('17:40:00'), onBottom: at('18:08:00'), offBottom: at('22:40:00'), onDeck: at('23:05:00') };
const gap = { from: Date.parse(at('20:00:00')), to: Date.parse(at('20:10:00')) };

/**
 * An invented log, every 10 s from launch to on deck, with a ten-minute gap on the bottom: the
 * vehicle comes down 400 m east of the work, circles within 15 m of it on the bottom, and leaves
 * 400 m to the north-west, so the descent and ascent run far off the plan's frame.
 */
function diveLog(): string {
  const lat0 = 36.145;
  const lon0 = -7.432;
  const mLat = 1 / 111_000;
  const mLon = 1 / (111_000 * Math.cos((lat0 * Math.PI) / 180));
  const work = { e: 20, n: 10 };
  const [l, b, o, d] = [phases.launch, phases.onBottom, phases.offBottom, phases.onDeck].map(Date.parse) as [
    number,
    number,
    number,
    number,
  ];
  const lines = ['time,depth_m,lat,lon,temperature_c'];
  for (let t = l; t <= d; t += 10_000) {
    if (t > gap.from && t < gap.to) continue;
    let e: number, n: number, depth: number;
    if (t < b) {
      const f = (t - l) / (b - l);
      [e, n, depth] = [400 + (work.e - 400) * f, -300 + (work.n + 300) * f, 600 * f];
    } else if (t <= o) {
      const a = (t - b) / 600_000;
      [e, n, depth] = [work.e + 15 * Math.cos(a), work.n + 15 * Math.sin(a), 600 + 2 * Math.sin(a)];
    } else {
      const f = (t - o) / (d - o);
      [e, n, depth] = [work.e + (-350 - work.e) * f, work.n + (400 - work.n) * f, 600 * (1 - f)];
    }
    lines.push(
      `${new Date(t).toISOString()},${depth.toFixed(2)},${(lat0 + n * mLat).toFixed(7)},${(lon0 + e * mLon).toFixed(7)},${(11 - depth / 600).toFixed(3)}`,
    );
  }
  return `${lines.join('\n')}\n`;
}

beforeAll(async () => {
  server = await startServerProcess();
  const [pilot, biologist, archaeologist] = await Promise.all([apiAs(emails.pilot), apiAs(emails.biologist), apiAs(emails.archaeologist)]);
  const campaigns = await pilot<{ id: string; name: string }[]>('/api/campaigns');
  campaignId = campaigns.find((c) => c.name === 'Varn Shoal 2026')!.id;
  diveId = (await pilot<{ id: string }>(`/api/campaigns/${campaignId}/dives`, 'POST', { number: diveNumber, objectives: 'Screens' })).id;
  for (const [phase, time] of [
    ['launch', phases.launch],
    ['on-bottom', phases.onBottom],
    ['off-bottom', phases.offBottom],
    ['on-deck', phases.onDeck],
  ] as const)
    await pilot(`/api/dives/${diveId}/phases`, 'POST', { phase, at: time });
  const log = new FormData();
  log.append('file', new Blob([diveLog()]), 'sr-01-nav.csv');
  await pilot(`/api/dives/${diveId}/telemetry`, 'POST', log);

  const entry = (who: Session, kind: string, title: string, time: string, extra: Record<string, unknown> = {}) =>
    who<{ id: string; version: number }>(`/api/dives/${diveId}/observations`, 'POST', { kind, title, observedAt: at(time), ...extra });
  const frames = await entry(biologist, 'biology', 'Frame grabs of the mat', '18:30:00');
  for (const [minute, title] of [
    ['19:00:00', 'Sponge on the frames'],
    ['21:15:00', 'Coral on the rudder'],
    ['22:05:00', 'Fish over the wreck'],
  ] as const)
    await entry(biologist, 'biology', title, minute);
  // In the log's gap: one with a typed depth, one with none at all.
  await entry(biologist, 'biology', 'Crab seen in the gap, depth typed', '20:04:00', { depth: 597 });
  await entry(biologist, 'biology', 'Crab seen in the gap, no depth', '20:06:00');
  for (const [time, number] of [
    ['19:30:00', 'SR-F1'],
    ['19:31:00', 'SR-F2'],
    ['21:40:00', 'SR-F3'],
  ] as const) {
    const made = await entry(archaeologist, 'archaeology', `Amphora ${number}`, time);
    await archaeologist(`/api/observations/${made.id}/find`, 'PUT', { version: made.version, findNumber: number });
  }

  const lead = await apiAs(emails.lead);
  for (const name of ['sr-old', 'sr-new']) await lead(`/api/campaigns/${campaignId}/tags`, 'POST', { name });
  unnamedId = (await entry(biologist, 'biology', 'Unnamed anemone, tagged', '21:50:00', { tags: ['sr-old'] })).id;
  leadEntryId = (await entry(lead, 'operations', 'Lead’s note to retire', '21:55:00')).id;

  // A 16:9 frame grab, an upright still and a square one.
  for (const [width, height, caption] of [
    [1600, 900, 'Frame grab with the burnt-in time and depth, which must stay whole in the gallery and wrap in the viewer on a phone'],
    [900, 1200, 'Upright still'],
    [1000, 1000, 'Square still'],
  ] as const) {
    const bytes = await sharp({ create: { width, height, channels: 3, background: { r: 30, g: 90, b: 110 } } })
      .jpeg()
      .toBuffer();
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(bytes)], { type: 'image/jpeg' }), `still-${width}x${height}.jpg`);
    const made = await biologist<{ id: string }[] | { id: string } | { photos: { id: string }[] }>(
      `/api/observations/${frames.id}/photos`,
      'POST',
      form,
    );
    const list = Array.isArray(made) ? made : 'photos' in made ? made.photos : [made];
    const id = list[0]!.id;
    await biologist(`/api/photos/${id}`, 'PATCH', { caption });
    photoSizes.set(id, { width, height });
  }
}, 120_000);
afterAll(async () => {
  await server?.stop();
});

type Rect = { x: number; y: number; width: number; height: number };
const overlap = (a: Rect, b: Rect) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

/** The box of the text itself (not its fixed-width holder), through a DOM range over its text. */
async function textBox(locator: Locator): Promise<Rect> {
  return locator.evaluate((el) => {
    const range = document.createRange();
    range.selectNodeContents(el);
    const r = range.getBoundingClientRect();
    return { x: r.x, y: r.y, width: r.width, height: r.height };
  });
}

async function box(locator: Locator): Promise<Rect> {
  const b = await locator.boundingBox();
  if (!b) throw new Error('element not laid out');
  return b;
}

// A theme changes colours, never sizes: each size is measured once, and each theme is seen once.
const combos = [
  ['phone', 'light'],
  ['wide', 'dark'],
] as const;

describe.each(combos)('the record’s screens at %s size, %s', (size, scheme) => {
  const viewport = viewports[size];

  async function open(email: string): Promise<{ page: Page; errors: string[]; close: () => Promise<void> }> {
    const browser = await openBrowser(viewport);
    await browser.page.emulateMedia({ colorScheme: scheme });
    await signInAs(browser.page, server.url, email);
    return browser;
  }

  it('shows each gallery photo at its own aspect ratio with its caption under it, and a viewer that fits', async () => {
    const b = await open(emails.guest);
    try {
      const page = b.page;
      await page.goto(`${server.url}/dives/${diveId}/gallery`);
      const tiles = page.getByTestId('gallery').locator('[data-testid^="gallery-photo-"]');
      await page.getByTestId('gallery').waitFor();
      await expect.poll(() => tiles.count(), { timeout: 15_000 }).toBe(3);
      for (const [id, px] of photoSizes) {
        const frame = await box(page.getByTestId(`gallery-frame-${id}`));
        // Each thumbnail's frame has the photo's own shape (within a pixel of rounding either way).
        expect(Math.abs(frame.width / frame.height - px.width / px.height)).toBeLessThan(0.03);
        const caption = await box(page.getByTestId(`gallery-caption-${id}`));
        expect(caption.y).toBeGreaterThanOrEqual(frame.y + frame.height - 1);
        expect(caption.x + caption.width).toBeLessThanOrEqual(viewport.width);
        expect(frame.x + frame.width).toBeLessThanOrEqual(viewport.width);
      }
      // The tag filters wrap inside the screen instead of running off it.
      const tags = page.getByTestId('gallery-tags');
      if ((await tags.count()) > 0) {
        for (const chip of await tags.locator('[data-testid^="gallery-tag-"]').all())
          expect((await box(chip)).x + (await box(chip)).width).toBeLessThanOrEqual(viewport.width);
      }

      const wide = [...photoSizes].find(([, px]) => px.width > px.height)![0];
      await page.getByTestId(`gallery-photo-${wide}`).click();
      const viewer = page.getByTestId('photo-viewer');
      await viewer.waitFor();
      const caption = await box(viewer.getByTestId('viewer-caption'));
      expect(caption.x + caption.width).toBeLessThanOrEqual(viewport.width);
      // A long caption wraps: more than one line high.
      expect(caption.height).toBeGreaterThan(size === 'phone' ? 30 : 15);
      const original = await box(viewer.getByTestId('viewer-original'));
      expect(original.x).toBeGreaterThanOrEqual(0);
      expect(original.x + original.width).toBeLessThanOrEqual(viewport.width);
      expect(original.y + original.height).toBeLessThanOrEqual(viewport.height);
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });

  it('keeps the site plan’s track inside its frame and its labels apart, and marks entries with no depth on the profile', async () => {
    const b = await open(emails.guest);
    try {
      const page = b.page;
      await page.goto(`${server.url}/dives/${diveId}/summary`);
      const plan = page.getByTestId('site-plan');
      await plan.getByTestId('north-arrow').waitFor();
      const frame = await box(plan.getByTestId('site-plan-frame'));
      const track = await box(plan.getByTestId('site-plan-track'));
      // The descent and ascent run 400 m off the work: cut at the frame, not drawn over the axes.
      expect(track.x).toBeGreaterThanOrEqual(frame.x - 1.5);
      expect(track.y).toBeGreaterThanOrEqual(frame.y - 1.5);
      expect(track.x + track.width).toBeLessThanOrEqual(frame.x + frame.width + 1.5);
      expect(track.y + track.height).toBeLessThanOrEqual(frame.y + frame.height + 1.5);

      const labels: [string, Rect][] = [];
      labels.push(['N', await textBox(plan.getByTestId('north-arrow'))]);
      labels.push(['scale', await textBox(plan.getByTestId('scale-bar'))]);
      if ((await plan.getByTestId('plan-datum-label').count()) > 0)
        labels.push(['Datum', await textBox(plan.getByTestId('plan-datum-label'))]);
      for (const f of await plan.locator('[data-testid^="plan-find-"]').all())
        labels.push([(await f.textContent()) ?? '', await textBox(f)]);
      expect(labels.filter(([name]) => name.startsWith('SR-F')).length).toBeGreaterThanOrEqual(2);
      const dots: Rect[] = [];
      for (const m of await plan.locator('[data-testid^="plan-marker-"]').all()) dots.push(await box(m.locator('div').first()));
      // Nine of the dive's entries have a position (the two in the log's gap have none).
      expect(dots.length).toBe(9);
      for (const [i, [name, r]] of labels.entries()) {
        expect(r.x, name).toBeGreaterThanOrEqual(frame.x - 1);
        expect(r.x + r.width, name).toBeLessThanOrEqual(frame.x + frame.width + 1);
        for (const [other, s] of labels.slice(i + 1)) expect(overlap(r, s), `${name} over ${other}`).toBe(false);
        for (const d of dots) expect(overlap(r, d), `${name} over a marker`).toBe(false);
      }

      const profile = page.getByTestId('depth-profile');
      await profile.getByTestId('profile-no-depth-label').waitFor();
      await page.getByTestId('legend-bottom-phase').waitFor();
      await page.getByTestId('legend-gap').waitFor();
      // The entry with no depth sits in the strip under the axis, below every time label.
      const strip = await box(profile.getByTestId('profile-no-depth-label'));
      for (const tick of await profile.getByTestId('profile-time-tick').all()) expect((await box(tick)).y).toBeLessThan(strip.y);
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });

  it('opens the dive settings to the pilot and the lead, and only tells the others who may', async () => {
    for (const [email, allowed] of [
      [emails.pilot, true],
      [emails.lead, true],
      [emails.biologist, false],
      [emails.guest, false],
    ] as const) {
      const b = await open(email);
      try {
        await b.page.goto(`${server.url}/dives/${diveId}/settings`);
        await b.page.getByTestId(allowed ? 'dive-settings-view' : 'dive-settings-refused').waitFor();
        expect(await b.page.getByTestId('telemetry-import').count()).toBe(allowed ? 1 : 0);
        if (allowed) {
          const view = await box(b.page.getByTestId('dive-settings-view'));
          expect(view.x + view.width).toBeLessThanOrEqual(viewport.width);
          // The dive has a log: the import adds to it unless told otherwise, and the options are switches.
          expect(await b.page.getByTestId('telemetry-mode-append').getAttribute('aria-checked')).toBe('true');
          expect(await b.page.getByTestId('telemetry-gps').getByRole('switch').count()).toBe(1);
          expect(await b.page.getByTestId('telemetry-absolute').getByRole('switch').count()).toBe(1);
        }
        // The summary is read-only for everyone.
        await b.page.goto(`${server.url}/dives/${diveId}/summary`);
        await b.page.getByTestId('dive-summary-view').waitFor();
        expect(await b.page.getByTestId('telemetry-import').count()).toBe(0);
        expect(await b.page.getByTestId('recording-save').count()).toBe(0);
        expect(await b.page.getByTestId('summary-dive-settings').count()).toBe(allowed ? 1 : 0);
        expect(b.errors).toEqual([]);
      } finally {
        await b.close();
      }
    }
  });
});

describe('an entry logged months after its dive', () => {
  it('is warned about, listed apart on the summary, and leaves the profile at the dive’s time scale', async () => {
    const b = await openBrowser(viewports.phone);
    try {
      const page = b.page;
      await signInAs(page, server.url, emails.biologist);
      await page.goto(`${server.url}/dives/${diveId}/new`);
      // The dive's window, drawn from the dive's data, means the form is live.
      await page.getByTestId('dive-window').getByText(`Dive ${diveNumber}:`).waitFor();
      await choose(page.getByTestId('field-kind-biology'));
      const title = 'Octopus in the amphora, from the video';
      await page.getByTestId('field-title').fill(title);
      await page.getByTestId('field-time').fill('2026-09-14 10:00:00');
      await page.getByTestId('time-outside-dive').waitFor();
      await page.getByTestId('save-observation').click();
      await page.getByTestId('dive-log').getByText(title).waitFor();

      await page.goto(`${server.url}/dives/${diveId}/summary`);
      const outside = page.getByTestId('outside-entries');
      await outside.waitFor();
      expect(await outside.textContent()).toContain(title);
      expect(await outside.textContent()).toContain('2026-09-14 10:00:00');
      // The "Whole dive" axis still runs over the dive's own hours (17:40 to 23:05 UTC), not to September.
      const ticks = await page.getByTestId('depth-profile').getByTestId('profile-time-tick').allTextContents();
      expect(ticks.length).toBeGreaterThanOrEqual(3);
      for (const t of ticks) {
        const [h] = t.split(':').map(Number);
        expect(h).toBeGreaterThanOrEqual(17);
        expect(h).toBeLessThanOrEqual(23);
      }
      // The profile's markers are the dive's own entries: the late one is not drawn.
      const svg = await box(page.getByTestId('depth-profile-svg'));
      for (const m of await page.getByTestId('depth-profile').locator('[data-testid^="profile-marker-"]').all()) {
        const r = await box(m);
        expect(r.x + r.width / 2).toBeLessThanOrEqual(svg.x + svg.width);
        expect(await m.getAttribute('aria-label')).not.toContain(title);
      }
      expect(await page.getByTestId('stat-entries').textContent()).toBe('11');
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('the tag vocabulary and the entry detail at phone size', () => {
  it('merges a tag from its chip with its entries counted, under the same words as its button', async () => {
    const b = await openBrowser(viewports.phone);
    try {
      const page = b.page;
      await signInAs(page, server.url, emails.lead);
      await page.goto(`${server.url}/campaigns/${campaignId}`);
      const button = page.getByTestId('campaign-settings');
      const words = (await button.textContent())!.trim();
      await button.click();
      // The screen's title reads as its button (the campaign screen stays beneath it in the stack).
      await page.getByRole('heading', { name: words, exact: true }).waitFor();
      const chip = page.getByTestId('vocab-sr-old');
      expect(await chip.textContent()).toBe('sr-old · 1 entry');
      await chip.click();
      expect(await page.getByTestId('tag-editor-title').textContent()).toContain('on 1 entry');
      await page.getByTestId('tag-merge-into-sr-new').click();
      await page.getByTestId('tag-merge').click();
      await expect.poll(() => page.getByTestId('vocab-sr-new').textContent()).toBe('sr-new · 1 entry');
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });

  it('folds the identification form of an unnamed entry and asks a lead before retiring, as it asks everyone', async () => {
    const b = await openBrowser(viewports.phone);
    try {
      const page = b.page;
      await signInAs(page, server.url, emails.lead);
      await page.goto(`${server.url}/observations/${unnamedId}`);
      await page.getByTestId('add-identification').waitFor();
      expect(await page.getByTestId('field-scientific-name').count()).toBe(0);
      await page.getByTestId('add-identification').click();
      await page.getByTestId('field-scientific-name').waitFor();

      await page.goto(`${server.url}/observations/${leadEntryId}`);
      await page.getByTestId('observation-detail').getByText('Lead’s note to retire').first().waitFor();
      await page.getByTestId('retire').click();
      await page.getByTestId('confirm-retire').waitFor();
      expect(await page.getByTestId('retired-banner').count()).toBe(0);
      await page.getByTestId('confirm-retire').click();
      await page.getByTestId('retired-banner').waitFor();
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
