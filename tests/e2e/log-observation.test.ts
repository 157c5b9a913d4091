import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
/** A campaign of the tests' own (display zone Europe/Lisbon) with a dive under way and no entries yet. */
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { underWay: true });
});
afterAll(async () => {
  await server?.stop();
});

async function signIn(page: Page, email: string) {
  await page.goto(server.url);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill('bathynote-demo');
  await page.getByTestId('sign-in-password').press('Enter');
}

async function openDive(page: Page) {
  await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
  await page.getByTestId(`dive-${fixtures.underWay!.number}`).click();
  await page.getByTestId('new-observation').waitFor();
}

describe.each([
  ['phone', viewports.phone],
  ['wide', viewports.wide],
] as const)('at %s size', (size, viewport) => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewport);
  });
  afterAll(async () => {
    await browser?.close();
  });

  const title = `Microbial mat on the port frames (${size})`;

  it('lets the biologist sign in, open a dive under way and log an observation', async () => {
    const { page } = browser;
    await signIn(page, 'biologist@bathynote.test');
    await page.getByTestId('campaign-list').waitFor();
    if (size === 'wide') {
      await page.getByRole('navigation', { name: 'Main' }).getByText('Bathynote').waitFor();
    }
    await openDive(page);
    await page.getByTestId('dive-phases').waitFor();

    await page.getByTestId('new-observation').click();
    await page.getByTestId('observation-form').waitFor();
    // The dive is under way: the time starts at now, to the second.
    expect(await page.getByTestId('field-time').inputValue()).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}$/);

    // Saving an empty form shows the contract's field messages instead of sending it.
    await page.getByTestId('save-observation').click();
    await page.getByTestId('field-title-error').waitFor();
    await page.getByText('Choose what kind of observation this is').waitFor();

    await page.getByTestId('field-kind-biology').click();
    await page.getByTestId('field-title').fill(title);
    await page.getByTestId('field-time').fill('2026-05-13 21:14:07');
    // As it is typed, the time also reads in the campaign's display zone (Lisbon is an hour ahead in May).
    expect(await page.getByTestId('field-time-hint').textContent()).toMatch(/^= 2026-05-13 22:14:07 \S+ \(Europe\/Lisbon\)$/);
    await page.getByTestId('field-depth').fill('601.5');
    await page.getByTestId('field-tag').fill('microbial');
    await page.getByTestId('tag-microbial-mat').click();
    await page.getByTestId('field-note').fill('White *filamentous* mat, **40 %** cover.');
    // On a phone the preview is behind a switch; on a wide screen it shows beside the note.
    if (size === 'phone') await page.getByTestId('note-preview-toggle').click();
    expect(await page.getByTestId('note-preview').locator('em').textContent()).toBe('filamentous');
    await page.getByTestId('save-observation').click();

    const card = page.getByTestId('dive-log').getByText(title);
    await card.waitFor();
    await page.reload();
    await page.getByTestId('dive-log').getByText(title).waitFor();

    await page.getByTestId('dive-log').getByText(title).click();
    const detail = page.getByTestId('observation-detail');
    await detail.waitFor();
    await expect.poll(() => detail.getByTestId('detail-title').textContent()).toBe(title);
    expect(await detail.getByTestId('fact-time').textContent()).toBe('2026-05-13 21:14:07.000Z');
    expect(await detail.getByTestId('fact-depth').textContent()).toBe('601.5 m');
    expect(await detail.getByTestId('detail-note').locator('strong').textContent()).toBe('40 %');
    if (size === 'wide') {
      // List and detail side by side: the log stays on screen beside the entry.
      expect(await page.getByTestId('detail-pane').isVisible()).toBe(true);
      expect(await page.getByTestId('dive-log').getByText(title).isVisible()).toBe(true);
    } else {
      expect(new URL(page.url()).pathname).toMatch(/^\/observations\//);
    }

    // A deep link into the app survives a reload.
    await page.reload();
    await page.getByTestId('observation-detail').getByText(title).waitFor();
    expect(browser.errors).toEqual([]);
  });

  it('shows the new entry to another member of the campaign', async () => {
    const other = await openBrowser(viewport);
    try {
      await signIn(other.page, 'lead@bathynote.test');
      await openDive(other.page);
      await other.page.getByTestId('dive-log').getByText(title).waitFor();
      expect(other.errors).toEqual([]);
    } finally {
      await other.close();
    }
  });
});

describe('a person outside the campaign', () => {
  it('sees no campaign, and a deep link into one shows nothing of it', async () => {
    const browser = await openBrowser(viewports.phone);
    try {
      const { page } = browser;
      await signIn(page, 'outsider@bathynote.test');
      await page.getByTestId('empty').getByText('No campaigns yet').waitFor();
      await page.goto(`${server.url}/dives/${fixtures.finished.id}`);
      await page.getByTestId('error').getByText('Nothing here').waitFor();
      expect(await page.content()).not.toContain('Varn Shoal');
      expect(await page.content()).not.toContain(fixtures.campaignName);
    } finally {
      await browser.close();
    }
  });
});
