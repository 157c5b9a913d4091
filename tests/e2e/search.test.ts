/**
 * Search in the browser: a typo query across two campaigns, a filter chip, the search in the URL
 * surviving a reload and the back button, and opening a result, at phone and wide sizes. The
 * entries are made here through the API with invented words found nowhere in the demo.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
const made: Record<'vent' | 'sponge' | 'crab', { id: string; title: string; campaignId: string }> = {} as never;
let campaigns: string[] = [];

beforeAll(async () => {
  server = await startServerProcess();
  const login = await fetch(`${server.url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: server.url },
    body: JSON.stringify({ email: 'lead@bathynote.test', password: 'bathynote-demo' }),
  });
  const cookie = login.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  const get = async <T>(p: string) => (await (await fetch(`${server.url}${p}`, { headers: { cookie } })).json()) as T;
  campaigns = (await get<{ id: string }[]>('/api/campaigns')).map((c) => c.id);
  expect(campaigns.length).toBeGreaterThanOrEqual(2);
  const firstDive = async (campaignId: string) => (await get<{ id: string }[]>(`/api/campaigns/${campaignId}/dives`))[0]!.id;
  const log = async (campaignId: string, kind: string, title: string, note = '') => {
    const res = await fetch(`${server.url}/api/dives/${await firstDive(campaignId)}/observations`, {
      method: 'POST',
      headers: { cookie, origin: server.url, 'content-type': 'application/json' },
      body: JSON.stringify({ kind, title, note }),
    });
    expect(res.status).toBe(201);
    return { id: ((await res.json()) as { id: string }).id, title, campaignId };
  };
  made.vent = await log(campaigns[0]!, 'environment', 'Quellmarine vent chimney', 'Shimmering water above it.');
  made.crab = await log(campaigns[0]!, 'biology', 'Quellmarine crab on the chimney');
  made.sponge = await log(campaigns[1]!, 'biology', 'Quellmarine sponge field');
});
afterAll(async () => {
  await server?.stop();
});

const result = (page: Page, key: keyof typeof made) => page.getByTestId(`search-result-${made[key].id}`);

describe('at phone size', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.phone);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('finds entries of both campaigns through a typo, narrows them with a chip, keeps the search in the URL and opens a result', async () => {
    const { page } = browser;
    await signInAs(page, server.url, 'lead@bathynote.test');
    await page.getByTestId('nav-search').click();
    // The campaign chips, drawn from data, mean the search screen is live before it is typed into.
    await page.getByTestId(`filter-campaign-${campaigns[0]}`).waitFor();
    await page.getByTestId('search-input').fill('quelmarine');
    await result(page, 'vent').waitFor();
    await result(page, 'sponge').waitFor();
    await result(page, 'crab').waitFor();
    // Grouped by campaign, with the matched word marked in the title.
    expect(await page.getByTestId(`search-group-${campaigns[0]}`).locator('[data-testid^="search-result-"]').count()).toBe(2);
    expect(await page.getByTestId(`search-group-${campaigns[1]}`).locator('[data-testid^="search-result-"]').count()).toBe(1);
    expect(await result(page, 'vent').getByTestId('search-match').first().textContent()).toBe('Quellmarine');
    await page.waitForURL(/q=quelmarine/);

    await page.getByTestId('filter-kind-biology').click();
    await result(page, 'vent').waitFor({ state: 'detached' });
    await result(page, 'sponge').waitFor();
    await page.waitForURL(/kind=biology/);

    // The URL alone brings the same search back.
    await page.reload();
    await result(page, 'crab').waitFor();
    expect(await page.getByTestId('search-input').inputValue()).toBe('quelmarine');
    expect(await page.getByTestId('filter-kind-biology').getAttribute('aria-checked')).toBe('true');
    expect(await result(page, 'vent').count()).toBe(0);

    await result(page, 'sponge').click();
    await page.waitForURL(new RegExp(`/observations/${made.sponge.id}`));
    expect(await page.getByTestId('detail-title').textContent()).toBe(made.sponge.title);
    await page.goBack();
    await result(page, 'sponge').waitFor();
    expect(await page.getByTestId('search-input').inputValue()).toBe('quelmarine');
    expect(browser.errors).toEqual([]);
  });

  it('says so when nothing matched, and remembers searches per person', async () => {
    const { page } = browser;
    await page.goto(`${server.url}/search?q=${encodeURIComponent('zzqqxxvv wwkk')}`);
    await page.getByTestId('empty').getByText('Nothing matched — try fewer words').waitFor();
    // A search is remembered when it is sent with Enter (or a result is opened).
    await page.getByTestId('search-input').fill('quelmarine');
    await page.getByTestId('search-input').press('Enter');
    await result(page, 'vent').waitFor();
    await page.getByTestId('search-clear').click();
    await page.getByTestId('recent-searches').getByText('quelmarine').waitFor();
  });
});

describe('at wide size', () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await openBrowser(viewports.wide);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('opens a shared search link, and with the keyboard shows each result beside the list', async () => {
    const { page } = browser;
    await signInAs(page, server.url, 'lead@bathynote.test');
    await page.goto(`${server.url}/search?q=quellmarine&campaignId=${campaigns[0]}`);
    await result(page, 'vent').waitFor();
    await result(page, 'crab').waitFor();
    expect(await result(page, 'sponge').count()).toBe(0);
    expect(await page.getByTestId(`filter-campaign-${campaigns[0]}`).getAttribute('aria-checked')).toBe('true');

    await page.locator('body').click({ position: { x: 5, y: 890 } });
    await page.keyboard.press('/');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('search-input');
    // Down from the box steps into the results; the chosen one shows beside them.
    await page.keyboard.press('ArrowDown');
    const first = await page.getByTestId('detail-pane').getByTestId('detail-title').textContent();
    expect([made.vent.title, made.crab.title]).toContain(first);
    await page.keyboard.press('ArrowDown');
    await page.waitForFunction(
      (before) => document.querySelector('[data-testid="detail-pane"] [data-testid="detail-title"]')?.textContent !== before,
      first,
    );
    await page.waitForURL(/entry=/);
    expect(browser.errors).toEqual([]);
  });
});
