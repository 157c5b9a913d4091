import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { reportSchema } from '@/lib/schemas';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, diveScreenDrawn, type E2eFixtures } from '../helpers/e2e-fixtures';
import { fixtureDivePhases, fixtureEntries } from '../helpers/fixtures';
import { assertPoppler, pdfImageCount, pdfInfo, pdfPageTexts, pdfText } from '../helpers/pdf';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let fixtures: E2eFixtures;
let dir: string;

const campaignName = 'Report print campaign 2026';
const vessel = 'RV Test Swell';
const vehicle = 'ROV Test Reach';
const permit = 'PERMIT-T-0042';
const faultTitle = 'Thruster 2 tripped';
// A short dive earlier on the same day, so the day's report runs across two dives.
const morningDive = 'RP-AM';
const morningEntry = 'Morning transect along the stern';

beforeAll(async () => {
  assertPoppler();
  server = await startServerProcess();
  dir = mkdtempSync(path.join(tmpdir(), 'bathynote-e2e-report-'));
  fixtures = await buildE2eFixtures(server.url, { campaignName, prefix: 'RP-', telemetry: true, entries: true });
  const { lead, pilot, biologist } = fixtures.as;
  await lead.call(`/api/campaigns/${fixtures.campaign}`, 'PATCH', { vessel, vehicle, permitRef: permit });
  // An equipment fault logged by the pilot near the end of the bottom time.
  await pilot.call(
    `/api/dives/${fixtures.finished.id}/observations`,
    'POST',
    {
      kind: 'operations',
      title: faultTitle,
      observedAt: new Date(fixtureDivePhases.offBottom.getTime() - 60_000).toISOString(),
      tags: ['fault'],
    },
    201,
  );
  const morning = await pilot.call<{ id: string }>(
    `/api/campaigns/${fixtures.campaign}/dives`,
    'POST',
    { number: morningDive, objectives: 'Stern transect' },
    201,
  );
  for (const [phase, at] of [
    ['launch', '2026-05-13T08:10:00.000Z'],
    ['on-bottom', '2026-05-13T08:35:00.000Z'],
    ['off-bottom', '2026-05-13T10:00:00.000Z'],
    ['on-deck', '2026-05-13T10:30:00.000Z'],
  ])
    await pilot.call(`/api/dives/${morning.id}/phases`, 'POST', { phase, at }, 200);
  await biologist.call(
    `/api/dives/${morning.id}/observations`,
    'POST',
    { kind: 'biology', title: morningEntry, observedAt: '2026-05-13T09:00:00.000Z' },
    201,
  );
  // One photo on the first biology entry.
  const photo = await sharp({ create: { width: 320, height: 200, channels: 3, background: { r: 30, g: 90, b: 120 } } })
    .png()
    .toBuffer();
  const first = fixtures.entries['White mat on the frames']!;
  await biologist.upload(`/api/observations/${first.id}/photos`, 'photo', 'mat.png', photo, 201);
  await lead.call(
    `/api/campaigns/${fixtures.campaign}/watches`,
    'PUT',
    {
      watches: [
        { name: 'Day watch', start: '08:00', end: '20:00', memberIds: [await fixtures.userId('biologist@bathynote.test')] },
        { name: 'Night watch', start: '20:00', end: '08:00', memberIds: [await fixtures.userId('archaeologist@bathynote.test')] },
      ],
    },
    200,
  );
});
afterAll(async () => {
  await server?.stop();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const signIn = (page: Page, email: string) => signInAs(page, server.url, email);

async function openDiveReport(page: Page): Promise<void> {
  await page.getByTestId('campaign-list').getByText(campaignName).click();
  await page.getByTestId(`dive-${fixtures.finished.number}`).click();
  await diveScreenDrawn(page, fixtures.finished.number);
  await page.getByTestId('dive-summary').click();
  await page.getByTestId('summary-dive-report').click();
  await page.getByTestId('report').waitFor();
  await page.getByTestId('report-depth-profile').locator('svg').first().waitFor();
  await page.getByTestId('report-photo').waitFor();
}

describe('the dive report at phone size', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.phone);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('shows the header, the sections and the entries, and stays within the screen', async () => {
    const { page } = browser;
    await signIn(page, 'guest@bathynote.test');
    await openDiveReport(page);
    const header = await page.getByTestId('report-header').innerText();
    for (const text of [campaignName, 'Test site', vessel, vehicle, permit, fixtures.finished.number, '2026-05-13'])
      expect(header).toContain(text);
    for (const id of ['dive', 'entries', 'finds', 'taxa', 'operations', 'watches'])
      await page.getByTestId(`report-section-${id}`).waitFor();
    expect(await page.getByTestId('report-entry').count()).toBe(fixtureEntries.length + 1);
    const box = await page.getByTestId('report').boundingBox();
    expect(box!.x + box!.width).toBeLessThanOrEqual(viewports.phone.width);
    expect(browser.errors).toEqual([]);
  });
});

describe('the report printed to PDF on a wide screen', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.wide);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('opens the daily report on the dive’s day from the campaign screen', async () => {
    const { page } = browser;
    await signIn(page, 'biologist@bathynote.test');
    await page.getByTestId('campaign-list').getByText(campaignName).click();
    await page.getByTestId('campaign-report').click();
    await page.getByTestId('report').waitFor();
    expect(await page.getByTestId('report-title').innerText()).toContain('2026-05-13');
    expect(await page.getByTestId('report-dives').innerText()).toContain(fixtures.finished.number);
    await page.getByTestId('report-day-2026-05-13').waitFor();
  });

  it('prints every section on A4 and on US Letter, with the app’s frame left out', async () => {
    const { page } = browser;
    await page.goto(`${server.url}/dives/${fixtures.finished.id}/report`);
    await page.getByTestId('report').waitFor();
    await page.getByTestId('report-depth-profile').locator('svg').first().waitFor();
    await page.getByTestId('report-photo').waitFor();
    await page.waitForFunction(() => [...document.images].every((i) => i.complete && i.naturalWidth > 0));

    // A reader on the dark theme (the system's, here) still gets the report in light colours.
    await page.emulateMedia({ colorScheme: 'dark' });
    const background = (testID: string) =>
      page
        .getByTestId(testID)
        .first()
        .evaluate((el) => getComputedStyle(el).backgroundColor);
    await expect.poll(() => background('screen-header')).toBe('rgb(13, 33, 48)'); // the dark surface, lib/tokens.ts
    expect(await background('report')).toBe('rgb(255, 253, 248)'); // the light surface
    expect(await page.getByTestId('report-title').evaluate((el) => getComputedStyle(el).color)).toBe('rgb(19, 33, 43)');

    // In print the navigation, the title bar and the report's own controls go, and the page is white.
    await page.emulateMedia({ media: 'print', colorScheme: 'dark' });
    expect(await page.evaluate(() => getComputedStyle(document.body).backgroundColor)).toBe('rgb(255, 255, 255)');
    expect(await page.getByTestId('nav-campaigns').isVisible()).toBe(false);
    expect(await page.getByTestId('report-print').isVisible()).toBe(false);
    expect(await page.getByTestId('report-section-entries').isVisible()).toBe(true);

    const a4 = path.join(dir, 'report-a4.pdf');
    writeFileSync(a4, await page.pdf({ preferCSSPageSize: true, printBackground: true }));

    await page.emulateMedia({ media: 'screen' });
    await page.getByTestId('report-paper-Letter').click();
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByTestId('report-print-style').textContent()).toContain('size: letter');
    const letter = path.join(dir, 'report-letter.pdf');
    writeFileSync(letter, await page.pdf({ preferCSSPageSize: true, printBackground: true }));

    const text = pdfText(a4);
    for (const t of [`Dive report · ${fixtures.finished.number}`, campaignName, 'Test site', vessel, vehicle, permit, '2026-05-13'])
      expect(text).toContain(t);
    for (const t of [
      `Entries (${fixtureEntries.length + 1})`,
      'Finds and samples',
      'Taxa seen (1)',
      'Operations',
      'On watch',
      'Statistics',
    ])
      expect(text).toContain(t);
    for (const e of fixtureEntries) expect(text).toContain(e.body.title);
    expect(text).toContain(`Equipment fault: ${faultTitle}`);
    expect(text).toContain('Madrepora oculata');
    expect(text).toContain(`Find ${fixtures.findNumber}`);
    expect(text).toContain('Day watch');
    // Nothing of the app's frame in print.
    expect(text).not.toContain('Print or save as PDF');
    expect(text).not.toContain('Search');

    // Each section starts a page: the entries' title opens one.
    const pages = pdfPageTexts(a4);
    expect(pages.some((p) => p.startsWith(`Entries (${fixtureEntries.length + 1})`))).toBe(true);
    expect(pages.some((p) => p.startsWith('Taxa seen'))).toBe(true);
    expect(pdfImageCount(a4)).toBeGreaterThanOrEqual(1);

    // Page sizes in points (1/72 in): A4 is 210 × 297 mm (ISO 216), US Letter 8.5 × 11 in (ANSI/ASME Y14.1).
    const infoA4 = pdfInfo(a4);
    const infoLetter = pdfInfo(letter);
    // Chromium rounds the page to whole CSS pixels, so within half a point.
    expect(infoA4.widthPt).toBeCloseTo(595.28, 0);
    expect(infoA4.heightPt).toBeCloseTo(841.89, 0);
    expect(infoLetter.widthPt).toBeCloseTo(612, 0);
    expect(infoLetter.heightPt).toBeCloseTo(792, 0);
    // This fixture prints on 8 pages on either paper: the header with the dive's phases and
    // statistics, the two plots, the entries over two pages, then finds and samples, taxa,
    // operations and watches a page each. A report that printed only the first screenful, or ran
    // sections together, would come out shorter.
    expect(infoA4.pages).toBe(8);
    expect(infoLetter.pages).toBe(8);
    expect(pdfText(letter)).toContain(`Entries (${fixtureEntries.length + 1})`);
    expect(browser.errors).toEqual([]);
  });

  it('prints the day’s report, made from the record across the day’s dives, with who stood each watch that day', async () => {
    const { page } = browser;
    const day = '2026-05-13';
    // What the screen shows is the campaign's day report as the API answers it.
    const report = reportSchema.parse(await fixtures.as.guest.call(`/api/campaigns/${fixtures.campaign}/reports/${day}`));
    expect(report.scope).toBe('day');
    expect(report.dives.map((d) => d.dive.number)).toEqual([morningDive, fixtures.finished.number]);
    // Midnight to midnight in the display zone: the end of one night watch, the day watch and the next night watch.
    expect(report.watches.map((w) => w.watch)).toEqual(['Night watch', 'Day watch', 'Night watch']);
    const standers = [...new Set(report.watches.flatMap((w) => w.members.map((m) => m.name)))];
    expect(standers).toHaveLength(2);

    await page.emulateMedia({ media: 'screen', colorScheme: 'light' });
    await page.goto(`${server.url}/campaigns/${fixtures.campaign}/report/${day}`);
    await page.getByTestId('report').waitFor();
    await page.getByTestId('report-depth-profile').locator('svg').first().waitFor();
    await page.getByTestId('report-photo').waitFor();
    await page.waitForFunction(() => [...document.images].every((i) => i.complete && i.naturalWidth > 0));
    await page.emulateMedia({ media: 'print' });
    // The day picker is the screen's control, not part of the paper.
    expect(await page.getByTestId('report-days').isVisible()).toBe(false);
    const file = path.join(dir, 'day-report-a4.pdf');
    writeFileSync(file, await page.pdf({ preferCSSPageSize: true, printBackground: true }));

    const text = pdfText(file);
    for (const t of [`Daily report · ${day}`, campaignName, 'Test site', vessel, vehicle, permit, morningDive, fixtures.finished.number])
      expect(text).toContain(t);
    expect(text).toContain(morningEntry);
    for (const t of [
      `Entries (${fixtureEntries.length + 1})`,
      'Finds and samples',
      'Taxa seen (1)',
      'Operations',
      'On watch',
      'Statistics',
    ])
      expect(text).toContain(t);
    for (const e of fixtureEntries) expect(text).toContain(e.body.title);
    expect(text).toContain(`Equipment fault: ${faultTitle}`);
    expect(text).toContain(`Find ${fixtures.findNumber}`);
    for (const t of ['Day watch', 'Night watch', ...standers]) expect(text).toContain(t);
    expect(text).not.toContain('Print or save as PDF');
    expect(text).not.toContain('Days with dives');
    expect(pdfImageCount(file)).toBeGreaterThanOrEqual(1);

    const info = pdfInfo(file);
    // A4 in points (ISO 216: 210 × 297 mm), within half a point as Chromium rounds to CSS pixels.
    expect(info.widthPt).toBeCloseTo(595.28, 0);
    expect(info.heightPt).toBeCloseTo(841.89, 0);
    const pages = pdfPageTexts(file);
    expect(pages.some((p) => p.startsWith(`Entries (${fixtureEntries.length + 1})`))).toBe(true);
    expect(pages.some((p) => p.startsWith('On watch'))).toBe(true);
    // Each dive's sections start pages of their own, in launch order, and the watches close the day:
    // the morning dive (no telemetry, so no plots) takes 5 pages (the day's header with its phases,
    // its one entry, finds and samples, taxa, operations), the evening dive 7 (phases and depth
    // profile, site plan, entries over two pages, finds, taxa, operations), and "On watch" one more.
    // A report that printed one dive only, or ran the dives together, would come out shorter.
    expect(pages[0]).toContain(morningDive);
    expect(pages.findIndex((p) => p.startsWith(`Dive ${fixtures.finished.number}`))).toBe(5);
    expect(info.pages).toBe(13);
    expect(browser.errors).toEqual([]);
  });
});
