import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
/** A campaign of the tests' own with one finished dive, EX-01, and none under way. */
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url);
});
afterAll(async () => {
  await server?.stop();
});

/** The dive cards of the campaign screen, top to bottom. */
const diveCards = (page: Page) => page.getByTestId('dive-list').locator('[data-testid^="dive-EX-"]');

describe.each([
  ['phone', viewports.phone, 'EX-02'],
  ['wide', viewports.wide, 'EX-03'],
] as const)('a pilot plans a dive at %s size', (size, viewport, expected) => {
  let pilot: Browser;

  beforeAll(async () => {
    pilot = await openBrowser(viewport);
    await signInAs(pilot.page, server.url, 'pilot@bathynote.test');
  });
  afterAll(async () => {
    await pilot?.close();
  });

  it('plans the next dive in the campaign’s pattern, edits the plan, and marks it launched', async () => {
    const page = pilot.page;
    await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
    await page.getByTestId('plan-dive').click();
    await page.getByTestId('dive-plan-form').waitFor();
    expect(await page.getByTestId('field-dive-number').inputValue()).toBe(expected);

    // A field's message goes away as soon as the field is fixed.
    await page.getByTestId('field-dive-start').fill('2026-13-01 10:00');
    await page.getByTestId('save-dive-plan').click();
    await page.getByTestId('field-dive-start-error').waitFor();
    await page.getByTestId('field-dive-start').fill('2026-06-02 18:30');
    expect(await page.getByTestId('field-dive-start-error').count()).toBe(0);

    await page.getByTestId('field-dive-objectives').fill(`Transect along the keel (${size})`);
    await page.getByTestId('field-dive-max-depth').fill('640');
    await page.getByTestId('save-dive-plan').click();
    await page.getByTestId(`dive-${expected}`).waitFor();
    if (size === 'phone') {
      // No dive of the campaign is under way, so the next planned one comes first.
      expect(await diveCards(page).first().getAttribute('data-testid')).toBe(`dive-${expected}`);
      expect(await page.getByTestId(`dive-${expected}`).getByTestId('dive-current').textContent()).toBe('Next');
    } else {
      // The dive launched at phone size is under way: it stays first, the new plan comes next.
      expect(await diveCards(page).nth(0).getAttribute('data-testid')).toBe('dive-EX-02');
      expect(await diveCards(page).nth(1).getAttribute('data-testid')).toBe(`dive-${expected}`);
    }
    expect(await page.getByTestId(`dive-${expected}`).textContent()).toContain('planned ≤ 640 m');

    await page.getByTestId(`dive-${expected}`).click();
    await page.getByTestId('edit-dive-plan').click();
    await page.getByTestId('field-dive-objectives').fill(`Transect along the keel, then the bow (${size})`);
    await page.getByTestId('save-dive-plan').click();
    await page.getByText(`Transect along the keel, then the bow (${size})`).waitFor();

    await page.getByTestId('phase-launch').click();
    await page.getByTestId('toast').getByText('marked').waitFor();
    await page.goBack();
    await page.getByTestId(`dive-${expected}`).getByTestId('dive-current').getByText('Under way').waitFor();
    expect(await diveCards(page).first().getAttribute('data-testid')).toBe(`dive-${expected}`);
    expect(pilot.errors).toEqual([]);
  });
});
