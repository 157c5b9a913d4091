/**
 * The export screen in Chromium, at phone and wide sizes: each export downloads from its card,
 * and the dive log's filter bar downloads the filtered list as CSV.
 */
import { readFileSync } from 'node:fs';

import { parse } from 'csv-parse/sync';
import { strFromU8, unzipSync } from 'fflate';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, signInAs, viewports } from '../helpers/chromium';
import { buildE2eFixtures, diveScreenDrawn, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
/** A campaign of the tests' own: a finished dive with a telemetry log (so positions) and twenty entries, one with a find. */
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { telemetry: true, entries: true });
});
afterAll(async () => {
  await server?.stop();
});

const decode = (bytes: Buffer) => new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);

/** Clicks `testId` and gives the downloaded file's name and bytes. */
async function downloadFrom(page: Page, testId: string): Promise<{ name: string; bytes: Buffer }> {
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testId).click()]);
  return { name: download.suggestedFilename(), bytes: readFileSync(await download.path()) };
}

async function openExports(page: Page) {
  await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
  await page.getByTestId('campaign-exports').click();
  await page.getByTestId('export-panel').waitFor();
}

describe('the export screen', () => {
  it('on a phone, the lead downloads each export from its card, and withholding positions empties the GIS file', async () => {
    const b = await openBrowser(viewports.phone);
    try {
      const { page } = b;
      await signInAs(page, server.url, 'lead@bathynote.test');
      await openExports(page);
      expect(await page.getByTestId('export-facts-darwin-core').textContent()).toMatch(/^\d+ occurrences · \d+ dives? · .* · about \d/);
      expect(await page.getByTestId('heritage-caution').textContent()).toContain('UNESCO 2001');
      expect(await page.getByTestId('export-card-finds').textContent()).toContain('Exact positions, always');

      const dwc = await downloadFrom(page, 'export-download-darwin-core');
      expect(dwc.name).toMatch(/darwin-core\.zip$/);
      const zip = unzipSync(dwc.bytes);
      expect(Object.keys(zip).sort()).toEqual(['eml.xml', 'measurementorfact.txt', 'meta.xml', 'occurrence.txt']);
      const occurrences = strFromU8(zip['occurrence.txt']!).trimEnd().split('\n');
      const rows = Number(/^(\d+)/.exec((await page.getByTestId('export-facts-darwin-core').textContent()) ?? '')![1]);
      expect(occurrences).toHaveLength(rows + 1);

      const finds = await downloadFrom(page, 'export-download-finds');
      expect(finds.name).toMatch(/find-register\.csv$/);
      expect(finds.bytes.subarray(0, 3)).toEqual(Buffer.from([0xef, 0xbb, 0xbf]));
      const register = parse<Record<string, string>>(decode(finds.bytes), { bom: true, columns: true });
      expect(register.length).toBeGreaterThan(0);
      expect(register[0]).toHaveProperty('Find number');

      const geo = await downloadFrom(page, 'export-download-geojson');
      expect(geo.name).toMatch(/\.geojson$/);
      expect((JSON.parse(decode(geo.bytes)) as { type: string }).type).toBe('FeatureCollection');

      const csv = await downloadFrom(page, 'export-download-csv');
      expect(csv.name).toMatch(/observations\.csv$/);
      expect(parse(decode(csv.bytes), { bom: true, columns: true }).length).toBeGreaterThan(rows);

      // Withholding positions: the card says so, and the GIS file has no point left.
      await page.getByTestId('export-positions-withheld').click();
      await page.getByTestId('export-card-geojson').getByText('Positions withheld.').waitFor();
      const hidden = JSON.parse(decode((await downloadFrom(page, 'export-download-geojson')).bytes)) as {
        features: unknown[];
        omitted: { positionWithheld: number };
      };
      expect(hidden.features).toEqual([]);
      expect(hidden.omitted.positionWithheld).toBeGreaterThan(0);
      await page.getByTestId('export-positions-grid-0.1').click();
      await page.getByTestId('export-card-geojson').getByText('Positions rounded to a 0.1° grid (about 10 km).').waitFor();
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });

  it('at a wide screen, a scientist sees the settings without changing them, and downloads a filtered dive log as CSV', async () => {
    const b = await openBrowser(viewports.wide);
    try {
      const { page } = b;
      await signInAs(page, server.url, 'biologist@bathynote.test');
      await openExports(page);
      expect(await page.getByTestId('publication-summary').textContent()).toContain('The lead sets these.');
      expect(await page.getByTestId('export-positions').count()).toBe(0);
      const finds = await downloadFrom(page, 'export-download-finds');
      expect(parse(decode(finds.bytes), { bom: true, columns: true }).length).toBeGreaterThan(0);

      await page.goBack();
      await page.getByTestId(`dive-${fixtures.finished.number}`).click();
      await diveScreenDrawn(page, fixtures.finished.number);
      await page.getByTestId('toggle-filters').click();
      await page.getByTestId('filter-kind-biology').click();
      const list = await downloadFrom(page, 'log-download-csv');
      expect(list.name).toMatch(/ex-01-observations\.csv$/);
      const rows = parse<Record<string, string>>(decode(list.bytes), { bom: true, columns: true });
      expect(rows.length).toBeGreaterThan(0);
      expect(rows.every((r) => r.kind === 'biology' && r.dive === fixtures.finished.number)).toBe(true);
      expect(b.errors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
