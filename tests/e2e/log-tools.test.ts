import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
/** A finished dive of the tests' own with a telemetry log and twenty entries by five people, one with a name, one with a find. */
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { telemetry: true, entries: true });
});
afterAll(async () => {
  await server?.stop();
});

const signIn = (page: Page, email: string) => signInAs(page, server.url, email);

async function openDive(page: Page) {
  await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
  await page.getByTestId(`dive-${fixtures.finished.number}`).click();
  await page.getByTestId('dive-log').locator('[data-testid^="observation-"]').first().waitFor();
}

/** The log's entries (cards or table rows), not the parts inside a card. */
const cards = (page: Page) =>
  page
    .getByTestId('dive-log')
    .locator(
      '[data-testid^="observation-"]:not([data-testid="observation-time"]):not([data-testid="observation-title"]):not([data-testid="observation-depth"]):not([data-testid="observation-timecode"])',
    );

const title = 'Rust-coloured concretion on the keelson';

describe('at phone size', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.phone);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('logs a typed position and temperature with a tag from the vocabulary, and shows them after a reload', async () => {
    const { page } = browser;
    await signIn(page, 'biologist@bathynote.test');
    await openDive(page);
    await page.getByTestId('new-observation').click();
    await page.getByTestId('observation-form').waitFor();
    await page.getByTestId('field-kind-environment').click();
    await page.getByTestId('field-title').fill(title);
    // The dive is over: its entries are logged at the time seen on the video.
    await page.getByTestId('field-time').fill('2026-05-13 20:12:30');

    // The contract's own range message, before anything is sent.
    await page.getByTestId('field-lat').fill('96.2');
    await page.getByTestId('field-lon').fill('-7.4318');
    await page.getByTestId('save-observation').click();
    expect(await page.getByTestId('field-lat-error').textContent()).toBe('Latitude is between -90 and 90');
    await page.getByTestId('field-lat').fill('36.1452');
    await page.getByTestId('field-temperature').fill('4,25');

    // Typing narrows the suggestions to the vocabulary's matches; Enter adds the first one.
    await page.getByTestId('field-tag').fill('concre');
    expect(await page.getByTestId('tag-suggestions').locator('[data-testid^="tag-"]').count()).toBe(1);
    await page.getByTestId('field-tag').press('Enter');
    await page.getByTestId('chosen-tag-concretion').waitFor();
    expect(await page.getByTestId('field-tag').inputValue()).toBe('');
    // A tap adds one too, and the chosen tag leaves the suggestions. A suggestion is a button to a
    // screen reader (it adds the tag once), not a checkbox.
    await page.getByTestId('field-tag').fill('hu');
    await page.getByTestId('tag-suggestions').getByRole('button', { name: 'Add tag hull' }).click();
    await page.getByTestId('chosen-tag-hull').waitFor();
    expect(await page.getByTestId('tag-concretion').count()).toBe(0);
    // A new tag that is part of a known one ("mat" in "microbial-mat") has its own chip, since the campaign takes free tags.
    await page.getByTestId('field-tag').fill('mat');
    await page.getByTestId('tag-microbial-mat').waitFor();
    await page.getByRole('button', { name: 'Add a new tag, mat' }).click();
    await page.getByTestId('chosen-tag-mat').waitFor();

    await page.getByTestId('save-observation').click();
    await page.getByTestId('dive-log').getByText(title).waitFor();
    await page.reload();
    await page.getByTestId('dive-log').getByText(title).click();
    const detail = page.getByTestId('observation-detail');
    await detail.getByText(title).waitFor();
    expect(await detail.getByTestId('fact-position').textContent()).toBe('36.14520° N, 7.43180° W');
    expect(await detail.getByTestId('source-position').textContent()).toBe('typed in');
    expect(await detail.getByTestId('fact-water').textContent()).toBe('4.25 °C');
    expect(await detail.getByTestId('source-water').textContent()).toBe('typed in');
    expect(await detail.getByTestId('detail-tags').textContent()).toBe('#concretion#hull#mat');
    expect(browser.errors).toEqual([]);
  });

  it('tells a member who is not the author why the entry cannot be edited', async () => {
    const other = await openBrowser(viewports.phone);
    try {
      await signIn(other.page, 'archaeologist@bathynote.test');
      await openDive(other.page);
      await other.page.getByTestId('dive-log').getByText(title).click();
      const detail = other.page.getByTestId('observation-detail');
      await detail.getByText(title).waitFor();
      expect(await detail.getByTestId('action-reason').textContent()).toBe('Only the author or a lead can edit or retire this entry.');
      expect(await detail.getByTestId('edit').count()).toBe(0);
    } finally {
      await other.close();
    }
  });

  it('tells a guest why they cannot verify a name or register a find, and the proposer why they cannot verify their own', async () => {
    // The biologist's coral entry carries her proposed name; the archaeologist's amphora a find.
    const coral = fixtures.entries['Coral on the rudder']!.id;
    const amphora = fixtures.entries['Amphora on its side']!.id;
    const guest = await openBrowser(viewports.phone);
    try {
      await signIn(guest.page, 'guest@bathynote.test');
      await guest.page.goto(`${server.url}/observations/${coral}`);
      await guest.page.getByTestId('scientific-name').waitFor();
      expect(await guest.page.getByTestId('identification-reason').textContent()).toBe('Scientists and leads verify names.');
      expect(await guest.page.getByTestId('verify').count()).toBe(0);
      await guest.page.goto(`${server.url}/observations/${amphora}`);
      await guest.page.getByTestId('find-number').waitFor();
      expect(await guest.page.getByTestId('find-reason').textContent()).toBe(
        'Scientists, leads and the entry’s author register and correct finds.',
      );
    } finally {
      await guest.close();
    }
    // The biologist wrote the coral entry: someone else verifies it.
    const author = await openBrowser(viewports.phone);
    try {
      await signIn(author.page, 'biologist@bathynote.test');
      await author.page.goto(`${server.url}/observations/${coral}`);
      await author.page.getByTestId('scientific-name').waitFor();
      expect(await author.page.getByTestId('identification-reason').textContent()).toMatch(/another scientist or a lead verifies it/);
      expect(await author.page.getByTestId('verify').count()).toBe(0);
    } finally {
      await author.close();
    }
  });
});

describe('at wide size', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.wide);
    await signIn(browser.page, 'lead@bathynote.test');
    await openDive(browser.page);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('shows the dive phases among the entries, as cards and in the table', async () => {
    const { page } = browser;
    await page.getByTestId('log-phase-launch').waitFor();
    await page.getByTestId('log-view-table').click();
    await page.getByTestId('log-phase-launch').waitFor();
    expect(await page.getByTestId('log-phase-onBottom').textContent()).toContain('On bottom');
    await page.getByTestId('log-view-cards').click();
  });

  it('narrows the log to one author', async () => {
    const { page } = browser;
    const all = await cards(page).count();
    await page.getByTestId('toggle-filters').click();
    await page.getByTestId('filter-authors').getByText('Bram Ostrander').click();
    await expect.poll(async () => (await cards(page).count()) < all).toBe(true);
    const authors = await cards(page).evaluateAll((els) => els.map((e) => e.textContent ?? ''));
    expect(authors.length).toBeGreaterThan(0);
    for (const text of authors) expect(text).toContain('Bram Ostrander');
    const chip = page.getByTestId('filter-authors').getByRole('checkbox', { name: /Bram Ostrander/ });
    await chip.click();
    await expect.poll(() => chip.getAttribute('aria-checked')).toBe('false');
    // Others' entries are back. (How many cards are drawn at once is up to the list's windowing, so
    // the count is not compared with the first one.)
    await expect
      .poll(
        async () =>
          (await cards(page).evaluateAll((els) => els.map((e) => e.textContent ?? ''))).some((t) => !t.includes('Bram Ostrander')),
        {
          timeout: 15_000,
        },
      )
      .toBe(true);
  });

  it('lets the lead find a retired entry and restore it', async () => {
    const { page } = browser;
    await page.getByTestId('dive-log').getByText(title).click();
    await page.getByTestId('observation-detail').getByText(title).waitFor();
    await page.getByTestId('retire').click();
    await page.getByTestId('confirm-retire').click();
    await page.getByTestId('retired-banner').waitFor();
    await expect.poll(() => page.getByTestId('dive-log').getByText(title).count()).toBe(0);

    await page.getByTestId('filter-retired').click();
    await page.getByTestId('dive-log').getByText(title).click();
    const detail = page.getByTestId('detail-pane');
    await detail.getByTestId('restore').click();
    await expect.poll(() => detail.getByTestId('retired-banner').count()).toBe(0);
    await expect.poll(() => page.getByTestId('dive-log').getByText(title).count()).toBe(0);

    await page.getByTestId('filter-retired').click();
    await page.getByTestId('dive-log').getByText(title).waitFor();
  });

  it('focuses the search box on "/" and narrows the loaded entries by title or note', async () => {
    const { page } = browser;
    await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
    await page.keyboard.press('/');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('log-search');
    expect(await page.getByTestId('log-search').inputValue()).toBe('');
    await page.keyboard.type('keelson');
    await expect.poll(() => cards(page).count()).toBe(1);
    await page.getByTestId('dive-log').getByText(title).waitFor();
    await page.getByTestId('search-count').waitFor();
    // Esc in the box empties it; Esc outside it closes the entry, and the keys are listed.
    await page.getByTestId('log-search').press('Escape');
    await expect.poll(async () => (await cards(page).count()) > 1).toBe(true);
    await page.keyboard.press('Escape');
    await page.getByTestId('detail-pane').getByText('/ search', { exact: false }).waitFor();
  });

  it('previews the note beside the field while typing', async () => {
    const { page } = browser;
    await page.getByTestId('new-observation').click();
    await page.getByTestId('observation-form').waitFor();
    expect(await page.getByTestId('note-preview-toggle').count()).toBe(0);
    await page.getByTestId('field-note').fill('A *Lophelia* thicket');
    await expect.poll(() => page.getByTestId('note-preview').locator('em').textContent()).toBe('Lophelia');
    expect(await page.getByTestId('field-note').isVisible()).toBe(true);
    expect(browser.errors).toEqual([]);
  });
});

describe('at laptop size (1024 × 768), between the phone and the wide layout', () => {
  it('offers the table, the keys that need no detail pane, and the log in order of depth', async () => {
    const browser = await openBrowser({ width: 1024, height: 768 });
    try {
      const { page } = browser;
      await signIn(page, 'biologist@bathynote.test');
      await openDive(page);
      await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
      await page.keyboard.press('f');
      await page.getByTestId('sort-deepest').click();
      await expect.poll(async () => (await page.getByTestId('sort-deepest').getAttribute('aria-checked')) === 'true').toBe(true);
      const depths = async () =>
        (await page.getByTestId('dive-log').getByTestId('observation-depth').allTextContents())
          .filter((t) => t !== '—')
          .map((t) => Number(t.replace(' m', '')));
      await expect
        .poll(async () => {
          const d = await depths();
          return d.length > 3 && d.every((v, i) => i === 0 || d[i - 1]! >= v);
        })
        .toBe(true);
      await page.getByTestId('sort-shallowest').click();
      await expect
        .poll(async () => {
          const d = await depths();
          return d.length > 3 && d.every((v, i) => i === 0 || d[i - 1]! <= v);
        })
        .toBe(true);

      await page.getByTestId('log-view-table').click();
      await page.getByRole('columnheader', { name: /Depth/ }).waitFor();
      await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
      await page.keyboard.press('/');
      expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('log-search');
      expect(browser.errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });
});
