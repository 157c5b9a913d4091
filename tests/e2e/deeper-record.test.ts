/**
 * The biology record in the browser: the lead imports a species list, a biologist names an entry
 * from the suggestions (a name outside the list is marked), counts and sizes it, records a sample,
 * and the Taxa screen lists what the dive saw, at phone and wide sizes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, diveScreenDrawn, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let fixtures: E2eFixtures;

const speciesList = [
  'scientificName,scientificNameAuthorship,taxonRank,scientificNameID,vernacularName',
  'Lophelia pertusa,"(Linnaeus, 1758)",species,urn:lsid:marinespecies.org:taxname:135161,stony coral',
  'Lophogorgia viminalis,,species,,',
  'Munida,,genus,,squat lobsters',
  'munida rugosa,,species,,',
].join('\n');

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { campaignName: 'Record test campaign', prefix: 'RT-' });
  const report = await fixtures.as.lead.upload<{ taken: number; rejected: unknown[] }>(
    `/api/campaigns/${fixtures.campaign}/checklist`,
    'file',
    'species.csv',
    speciesList,
  );
  expect(report.taken).toBe(3);
  expect(report.rejected).toHaveLength(1);
});
afterAll(async () => {
  await server?.stop();
});

async function newEntry(title: string, minute: number): Promise<string> {
  const made = await fixtures.as.biologist.call<{ id: string }>(`/api/dives/${fixtures.finished.id}/observations`, 'POST', {
    kind: 'biology',
    title,
    observedAt: new Date(Date.UTC(2026, 4, 13, 19, minute)).toISOString(),
    depth: 600 + minute / 10,
  });
  return made.id;
}

async function openEntry(page: Page, id: string) {
  await page.goto(`${server.url}/observations/${id}`);
  await page.getByTestId('observation-detail').waitFor();
}

describe.each([
  ['phone', viewports.phone, 1],
  ['wide', viewports.wide, 2],
] as const)('at %s size', (_size, viewport, n) => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewport);
    await signInAs(browser.page, server.url, 'biologist@bathynote.test');
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('suggests names from the species list as one types and marks a name outside the list', async () => {
    const { page } = browser;
    const id = await newEntry(`Stony coral thicket ${n}`, 10 * n);
    await openEntry(page, id);
    await page.getByTestId('add-identification').click();
    const name = page.getByTestId('field-scientific-name');
    await name.fill('Loph');
    const suggestions = page.getByTestId('name-suggestions');
    await suggestions.getByText('Lophelia pertusa').waitFor();
    expect(await suggestions.getByText('Lophogorgia viminalis').count()).toBe(1);
    await page.getByTestId('name-suggestion-Lophelia pertusa').click();
    expect(await name.inputValue()).toBe('Lophelia pertusa');
    expect(await page.getByTestId('name-outside-list').count()).toBe(0);
    await page.getByTestId('save-identification').click();
    await page.getByTestId('scientific-name').getByText('Lophelia pertusa').waitFor();

    // A name the list does not have is allowed, and said to be outside it.
    const other = await newEntry(`Unlisted sea pen ${n}`, 10 * n + 1);
    await openEntry(page, other);
    await page.getByTestId('add-identification').click();
    await page.getByTestId('field-scientific-name').fill('Pennatula phosphorea');
    await page.getByTestId('name-outside-list').waitFor();
    await page.getByTestId('save-identification').click();
    await page.getByTestId('scientific-name').getByText('Pennatula phosphorea').waitFor();
    expect(browser.errors).toEqual([]);
  });

  it('counts and sizes an entry, names its substrate and records a sample, then shows them', async () => {
    const { page } = browser;
    const id = await newEntry(`Squat lobsters on the boiler ${n}`, 10 * n + 2);
    await openEntry(page, id);
    await page.getByTestId('edit-record').click();
    await page.getByTestId('field-individual-count').fill('-2');
    await page.getByTestId('save-record').click();
    await page.getByText('A count cannot be negative').waitFor();
    await page.getByTestId('field-individual-count').fill('6');
    await page.getByTestId('field-size-length').fill('4.5');
    await page.getByTestId('field-size-length-method-measured').click();
    await page.getByTestId('substrate-Metal').click();
    await page.getByTestId('save-record').click();
    await page.getByTestId('record-facts').getByText('6 counted · length 4.5 cm · on Metal').waitFor();

    await page.getByTestId('add-sample').click();
    await page.getByTestId('field-sample-number').fill(`RT-S${n}`);
    await page.getByTestId('save-sample').click();
    await page.getByTestId('sample-number').getByText(`RT-S${n}`).waitFor();
    await page.getByTestId('sample-no-custody').waitFor();
    expect(browser.errors).toEqual([]);
  });

  it('lists the dive’s taxa with entries, count and depth, opens a taxon to its entries, and shows the sample register flagged', async () => {
    const { page } = browser;
    const id = await newEntry(`Squat lobster pair ${n}`, 10 * n + 3);
    await fixtures.as.biologist.call(`/api/observations/${id}`, 'PATCH', { version: 1, individualCount: 2 });
    await fixtures.as.biologist.call(`/api/observations/${id}/identification`, 'PUT', {
      version: 2,
      scientificName: 'Munida',
      taxonRank: 'genus',
    });
    await page.goto(`${server.url}/dives/${fixtures.finished.id}`);
    await diveScreenDrawn(page, fixtures.finished.number);
    await page.getByTestId('dive-taxa').click();
    const row = page.getByTestId('taxon-Munida');
    await row.waitFor();
    const text = (await row.textContent()) ?? '';
    expect(text).toContain(`${n} ${n === 1 ? 'entry' : 'entries'}`);
    expect(text).toContain(`${2 * n} counted`);
    expect(text).toContain('0 % verified');
    await page.getByTestId('taxon-Pennatula phosphorea').getByText('not on the species list').waitFor();
    await row.getByRole('button').first().click();
    await row.getByTestId('taxon-entries').getByText(`Squat lobster pair ${n}`, { exact: false }).click();
    await page.getByTestId('observation-detail').getByText(`Squat lobster pair ${n}`).first().waitFor();

    await page.goto(`${server.url}/dives/${fixtures.finished.id}/taxa`);
    // The list drawn from data means the screen is live, not the server-rendered page a click would miss.
    await page.getByTestId('taxon-Munida').waitFor();
    const samples = page.getByTestId('record-view-samples');
    await samples.click();
    // A click taken while the screen was still settling is given again, as a person would.
    if ((await samples.getAttribute('aria-checked')) !== 'true') await samples.click();
    await page.locator('[data-testid="record-view-samples"][aria-checked="true"]').waitFor();
    // The fixture dive is on deck and nobody has taken the sample: it is flagged.
    await page.getByTestId(`sample-RT-S${n}`).getByTestId('sample-flag').waitFor();
    // Nothing of the list runs past the screen's edge.
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    expect(browser.errors).toEqual([]);
  });
});
