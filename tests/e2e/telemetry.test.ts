import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, diveScreenDrawn, type E2eFixtures } from '../helpers/e2e-fixtures';
import { fixtureDivePhases } from '../helpers/fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { csv, iso } from '../fixtures/telemetry/logs';
import { pressureFromDepth } from '@/lib/seawater';

let server: ServerProcess;
/** A finished dive of the tests' own with twenty entries and no telemetry log yet, and a dive under way today. */
let fixtures: E2eFixtures;
let dir: string;
let diveId: string;
let logFile: string;
let rowsInLog: number;

/** A log of the dive every 5 s from before launch to after on deck, with two broken rows. */
function writeDiveLog(phases: { launch: number; onBottom: number; offBottom: number; onDeck: number }): void {
  const rows: string[][] = [];
  for (let t = phases.launch - 120_000; t <= phases.onDeck + 120_000; t += 5000) {
    const depth =
      t < phases.launch || t > phases.onDeck
        ? 0
        : t < phases.onBottom
          ? (598 * (t - phases.launch)) / (phases.onBottom - phases.launch)
          : t <= phases.offBottom
            ? 598 + 3 * Math.sin(t / 600_000)
            : (598 * (phases.onDeck - t)) / (phases.onDeck - phases.offBottom);
    const m = (t - phases.launch) / 60_000;
    rows.push([
      iso(t),
      depth.toFixed(2),
      (36.145 + 0.0003 * Math.sin(m / 20)).toFixed(7),
      (-7.432 + 0.0004 * Math.cos(m / 15)).toFixed(7),
      (10.8 + 6 * Math.exp(-depth / 110)).toFixed(3),
    ]);
  }
  rowsInLog = rows.length;
  rows.splice(3, 0, [iso(phases.launch - 100_000), 'deep', '36.145', '-7.432', '17.1']);
  rows.splice(8, 0, ['not a time', '0', '36.145', '-7.432', '17.1']);
  writeFileSync(logFile, csv(['time', 'depth_m', 'lat', 'lon', 'temperature_c'], rows));
}

beforeAll(async () => {
  server = await startServerProcess();
  dir = mkdtempSync(path.join(tmpdir(), 'bathynote-e2e-log-'));
  logFile = path.join(dir, 'skerry-vs-02-nav.csv');
  fixtures = await buildE2eFixtures(server.url, { entries: true, underWay: true });
  diveId = fixtures.finished.id;
  const { launch, onBottom, offBottom, onDeck } = fixtureDivePhases;
  writeDiveLog({ launch: launch.getTime(), onBottom: onBottom.getTime(), offBottom: offBottom.getTime(), onDeck: onDeck.getTime() });
});
afterAll(async () => {
  await server?.stop();
  rmSync(dir, { recursive: true, force: true });
});

const signIn = (page: Page, email: string) => signInAs(page, server.url, email);

describe('the dive summary at phone size', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.phone);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('lets the pilot import the vehicle log, read the report, and open an entry from the depth profile', async () => {
    const { page } = browser;
    await signIn(page, 'pilot@bathynote.test');
    await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
    await page.getByTestId(`dive-${fixtures.finished.number}`).click();
    await diveScreenDrawn(page, fixtures.finished.number);
    await page.getByTestId('dive-summary').click();
    // No log yet: the summary says so, and the pilot imports one on the dive's settings.
    await page.getByTestId('telemetry-empty').waitFor();
    await page.getByTestId('navigation-caution').waitFor();
    await page.getByTestId('summary-dive-settings').click();
    await page.getByTestId('dive-settings-view').waitFor();

    await page.getByTestId('telemetry-file').setInputFiles(logFile);
    await page.getByTestId('telemetry-columns').getByText('time → time').waitFor();
    expect(await page.getByTestId('telemetry-file-name').textContent()).toContain('skerry-vs-02-nav.csv');
    // A recognised column can be read as nothing (say the sensor failed) and back again.
    const temperature = page.getByTestId('telemetry-column-temperature_c');
    expect(await temperature.textContent()).toBe('temperature_c → temperature (°C)');
    await temperature.click();
    await page.getByTestId('telemetry-map-temperature_c-ignore').click();
    expect(await temperature.textContent()).toBe('temperature_c: not read');
    await page.getByTestId('telemetry-map-temperature_c-temperature').click();
    expect(await temperature.textContent()).toBe('temperature_c → temperature (°C)');

    // Over a thin satellite link (64 kB/s up) the upload shows its progress as it goes.
    const cdp = await browser.context.newCDPSession(page);
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 300,
      downloadThroughput: -1,
      uploadThroughput: 64 * 1024,
    });
    await page.getByTestId('telemetry-upload').click();
    const bar = page.getByTestId('telemetry-progress');
    await bar.waitFor();
    const sent = async () => Number(await bar.getAttribute('aria-valuenow'));
    await expect.poll(sent, { timeout: 10_000 }).toBeGreaterThan(0);
    const first = await sent();
    await expect.poll(sent, { timeout: 10_000 }).toBeGreaterThan(first);
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });

    const report = page.getByTestId('telemetry-report');
    await report.waitFor({ timeout: 60_000 });
    expect(await report.getByTestId('report-taken').textContent()).toBe(rowsInLog.toLocaleString('en'));
    expect(await report.getByTestId('report-rejected').textContent()).toBe('2');
    const rejections = await report.getByTestId('report-rejections').textContent();
    expect(rejections).toContain('Line 5: depth "deep" is not a number');
    expect(rejections).toContain('Line 10:');
    expect(await report.getByTestId('report-span').textContent()).toMatch(/^Covers 2026-05-13 /);

    // Back on the summary, the plots are drawn from the log.
    await page.goBack();
    await page.getByTestId('depth-profile-svg').waitFor();
    const markers = page.getByTestId('depth-profile').locator('[data-testid^="profile-marker-"]');
    await expect.poll(() => markers.count()).toBeGreaterThan(10);
    // Where entries crowd, a marker's neighbour can cover it: tap the first one a finger can reach.
    let marker = markers.first();
    for (let i = 0; i < (await markers.count()); i++) {
      const reachable = await markers
        .nth(i)
        .click({ trial: true, timeout: 1000 })
        .then(() => true)
        .catch(() => false);
      if (reachable) {
        marker = markers.nth(i);
        break;
      }
    }
    const id = ((await marker.getAttribute('data-testid')) ?? '').replace('profile-marker-', '');
    await marker.click();
    await page.getByTestId('observation-detail').waitFor();
    expect(new URL(page.url()).pathname).toBe(`/observations/${id}`);
    const depth = Number((await page.getByTestId('fact-depth').textContent())!.replace(' m', ''));
    expect(await page.getByTestId('fact-depth').textContent()).toMatch(/^\d+\.\d m$/);
    // Beside the depth, the sea pressure there by Saunders (1981) at the entry's latitude (lib/seawater.ts,
    // checked against the paper's own values in tests/unit/seawater.test.ts).
    const [lat] = (await page.getByTestId('fact-position').textContent())!.split('°');
    // (The depth shown is rounded to 0.1 m, so the two agree to about 0.1 dbar.)
    const shown = /^≈ (\d+\.\d) dbar$/.exec((await page.getByTestId('fact-pressure').textContent()) ?? '');
    expect(shown).not.toBeNull();
    expect(Math.abs(Number(shown![1]) - pressureFromDepth(depth, Number(lat)))).toBeLessThanOrEqual(0.15);
    expect(browser.errors).toEqual([]);
  });
});

describe('the dive summary on a wide screen', () => {
  it('shows the depth profile and the site plan side by side, and the statistics', async () => {
    const browser = await openBrowser(viewports.wide);
    try {
      const { page } = browser;
      await signIn(page, 'lead@bathynote.test');
      await page.goto(`${server.url}/dives/${diveId}/summary`);
      const profile = page.getByTestId('depth-profile-svg');
      const plan = page.getByTestId('site-plan-svg');
      await profile.waitFor();
      await plan.waitFor();
      await page.getByTestId('dive-stats').waitFor();
      const a = (await profile.boundingBox())!;
      const b = (await plan.boundingBox())!;
      expect(a.x + a.width).toBeLessThanOrEqual(b.x + 1);
      expect(Math.abs(a.y - b.y)).toBeLessThan(40);
      expect(b.width).toBeGreaterThan(300);

      expect(await page.getByTestId('stat-max-depth').textContent()).toMatch(/^\d{3}\.\d m$/);
      expect(await page.getByTestId('stat-bottom').textContent()).toMatch(/^\d+ h \d{2} min$/);
      expect(await page.getByTestId('scale-bar').textContent()).toMatch(/^\d+ m$/);
      await page.getByTestId('north-arrow').waitFor();
      expect(await page.getByTestId('site-plan').locator('[data-testid^="plan-marker-"]').count()).toBeGreaterThan(5);
      expect(await page.getByTestId('depth-profile').locator('[data-testid^="profile-marker-"]').count()).toBeGreaterThan(5);
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it('lets the pilot set the video clock, then log an entry by typing the time code on screen', async () => {
    const browser = await openBrowser(viewports.wide);
    try {
      const { page } = browser;
      await signIn(page, 'pilot@bathynote.test');
      await page.goto(`${server.url}/dives/${diveId}/settings`);
      await page.getByTestId('recording-settings').waitFor();
      // No example time in grey inside the field, where it would read as a clock already set.
      expect(await page.getByTestId('recording-start').inputValue()).toBe('');
      expect(await page.getByTestId('recording-start').getAttribute('placeholder')).toBeNull();
      await page.getByTestId('recording-start').fill('2026-05-13 17:35:00');
      await page.getByTestId('frame-rate-29-97-DF').click();
      await page.getByTestId('recording-save').click();
      await page.getByTestId('recording-saved').waitFor();

      await page.goto(`${server.url}/dives/${diveId}`);
      await diveScreenDrawn(page, fixtures.finished.number);
      await page.getByTestId('new-observation').click();
      await page.getByTestId('observation-form').waitFor();
      // 00:01:00;00 is a label 29.97 drop-frame never shows (SMPTE ST 12-1 drops frames 0 and 1 of each minute but every tenth).
      await page.getByTestId('timecode-input').fill('00:01:00;00');
      await page.getByTestId('timecode-apply').click();
      await page.getByTestId('timecode-input-error').waitFor();
      // 01:00:00;00 began 3 599.997 s after the first frame (the arithmetic of tests/unit/timecode.test.ts).
      await page.getByTestId('timecode-input').fill('01:00:00;00');
      await page.getByTestId('timecode-apply').click();
      expect(await page.getByTestId('field-time').inputValue()).toBe('2026-05-13 18:34:59.997');
      expect(await page.getByTestId('timecode-input-error').count()).toBe(0);

      const title = 'Amphora neck in frame on the recording';
      await page.getByTestId('field-kind-archaeology').click();
      await page.getByTestId('field-title').fill(title);
      await page.getByTestId('save-observation').click();
      // The log shows every entry's time code beside its time, once the dive's video clock is set.
      const card = page.getByTestId('dive-log').locator('[data-testid^="observation-"]').filter({ hasText: title }).first();
      await card.waitFor();
      expect(await card.getByTestId('observation-timecode').textContent()).toBe('TC 01:00:00;00');
      await page.getByTestId('dive-log').getByText(title).click();
      const detail = page.getByTestId('observation-detail');
      await expect.poll(() => detail.getByTestId('detail-title').textContent()).toBe(title);
      expect(await detail.getByTestId('fact-time').textContent()).toBe('2026-05-13 18:34:59.997Z');
      expect(await detail.getByTestId('timecode').textContent()).toBe('TC 01:00:00;00');
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it('lets the pilot correct a phase marked late, with the statistics following, and undo it', async () => {
    const browser = await openBrowser(viewports.wide);
    try {
      const { page } = browser;
      await signIn(page, 'pilot@bathynote.test');
      // The summary open beside the dive's settings, as in a second tab: it follows the change live.
      const summary = await browser.context.newPage();
      await summary.goto(`${server.url}/dives/${diveId}/summary`);
      const bottom = summary.getByTestId('stat-bottom');
      await bottom.waitFor();
      await page.goto(`${server.url}/dives/${diveId}/settings`);
      const minutes = async () => {
        const [, h, m] = /^(\d+) h (\d{2}) min$/.exec((await bottom.textContent()) ?? '')!;
        return Number(h) * 60 + Number(m);
      };
      const before = await minutes();
      const field = page.getByTestId('phase-time-on-bottom');
      const original = await field.inputValue();
      const marked = Date.parse(`${original.replace(' ', 'T')}Z`);
      const utc = (t: number) => new Date(t).toISOString().slice(0, 23).replace('T', ' ');

      // Touchdown was marked ten minutes late: the bottom time is ten minutes shorter once corrected.
      await field.fill(utc(marked + 10 * 60_000));
      await page.getByTestId('phase-save-on-bottom').click();
      await page.getByTestId('toast').getByText('On bottom set to').waitFor();
      await expect.poll(minutes, { timeout: 5000 }).toBe(before - 10);
      await page.getByTestId('toast-action').click();
      await expect.poll(minutes, { timeout: 5000 }).toBe(before);
      expect(await field.inputValue()).toBe(original);

      // Phases follow each other: on bottom cannot come after off bottom.
      const offBottom = Date.parse(`${(await page.getByTestId('phase-time-off-bottom').inputValue()).replace(' ', 'T')}Z`);
      await field.fill(utc(offBottom + 60_000));
      await field.press('Enter');
      expect(await page.getByTestId('phase-time-on-bottom-error').textContent()).toMatch(/^on-bottom cannot be after off-bottom/);
      expect(await minutes()).toBe(before);
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it('takes a log whose hours miss the dive, and says so naming both spans', async () => {
    const browser = await openBrowser(viewports.wide);
    try {
      const { page } = browser;
      const dive = fixtures.underWay!;
      const launched = (await fixtures.as.pilot.call<{ phases: { launch: string } }>(`/api/dives/${dive.id}`)).phases.launch;
      await signIn(page, 'pilot@bathynote.test');
      await page.goto(`${server.url}/dives/${dive.id}/settings`);
      // The log of 2026-05-13, picked for the dive launched today: a log of another dive.
      await page.getByTestId('telemetry-file').setInputFiles(logFile);
      await page.getByTestId('telemetry-columns').getByText('time → time').waitFor();
      await page.getByTestId('telemetry-upload').click();
      const report = page.getByTestId('telemetry-report');
      await report.waitFor({ timeout: 60_000 });
      expect(await report.getByTestId('report-taken').textContent()).toBe(rowsInLog.toLocaleString('en'));
      const warning = (await report.getByTestId('import-warning-outside_dive').textContent()) ?? '';
      expect(warning).toContain('2026-05-13');
      expect(warning).toContain(launched.slice(0, 10));
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it('shows a guest the plots without the import', async () => {
    const browser = await openBrowser(viewports.wide);
    try {
      const { page } = browser;
      await signIn(page, 'guest@bathynote.test');
      await page.goto(`${server.url}/dives/${diveId}/summary`);
      await page.getByTestId('depth-profile-svg').waitFor();
      await page.getByTestId('import-history').waitFor();
      expect(await page.getByTestId('telemetry-import').count()).toBe(0);
      // The video clock the pilot set, to read only.
      const settings = page.getByTestId('recording-settings');
      expect(await settings.textContent()).toContain('Recording started 2026-05-13 17:35:00Z at 29.97 DF fps');
      expect(await settings.textContent()).toContain('Only the lead or the pilot can change these.');
      expect(await page.getByTestId('recording-save').count()).toBe(0);
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });
});
