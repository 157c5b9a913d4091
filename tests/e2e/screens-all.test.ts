/**
 * Every screen of the app, at phone size in the light theme and wide in the dark: a screenshot of each (kept in
 * the temporary folder for a person to look at) and the layout rules measured on it. No text runs
 * past the window's edges, the screen's title is whole and clear of its header's buttons, the
 * header's buttons do not overlap one another, and nothing fails in the page. The dive log's and
 * the record screens' own rules are in screens-log and screens-record.
 */
import { mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { overlaps, textPastEdges, type Box } from '../helpers/layout';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

const shots = path.join(tmpdir(), 'bathynote-screens');

let server: ServerProcess;
let fixtures: E2eFixtures;
let entryId: string;

beforeAll(async () => {
  mkdirSync(shots, { recursive: true });
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, {
    campaignName: 'Every screen campaign, west flank',
    prefix: 'ES-',
    telemetry: true,
    entries: true,
  });
  entryId = Object.values(fixtures.entries)[0]!.id;
});
afterAll(async () => {
  await server?.stop();
});

/** The title's box, whether it is cut off, and the boxes of the header's buttons. */
function headerLayout(page: Page): Promise<{ title: Box | null; cut: boolean; buttons: (Box & { label: string })[] }> {
  return page.evaluate(() => {
    const header = document.querySelector('[data-testid="screen-header"]');
    const title = header?.querySelector('[data-testid="screen-title"]') as HTMLElement | null;
    const rect = (el: Element) => {
      const r = el.getBoundingClientRect();
      return { x: r.x, y: r.y, width: r.width, height: r.height };
    };
    const buttons = Array.from(header?.querySelectorAll('[role="button"], [role="link"]') ?? [])
      .filter((b) => b.getAttribute('data-testid') !== 'back')
      .map((b) => ({ ...rect(b), label: (b.textContent ?? '').trim() }))
      .filter((b) => b.width > 0 && b.height > 0);
    return {
      title: title ? rect(title) : null,
      cut: title ? title.scrollWidth > title.clientWidth + 1 || title.scrollHeight > title.clientHeight + 1 : false,
      buttons,
    };
  });
}

type Screen = { name: string; as: 'lead' | 'admin'; path: () => string; ready: string };

const screens: Screen[] = [
  { name: 'campaigns', as: 'lead', path: () => '/', ready: 'campaign-list' },
  { name: 'campaign', as: 'lead', path: () => `/campaigns/${fixtures.campaign}`, ready: 'dive-ES-01' },
  { name: 'team', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/team`, ready: 'screen-title' },
  { name: 'tags', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/settings`, ready: 'screen-title' },
  { name: 'biology', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/biology`, ready: 'substrate-settings' },
  { name: 'campaign-taxa', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/taxa`, ready: 'taxa' },
  { name: 'exports', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/exports`, ready: 'screen-title' },
  { name: 'digest', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/digest`, ready: 'screen-title' },
  { name: 'dive-log', as: 'lead', path: () => `/dives/${fixtures.finished.id}`, ready: 'dive-log' },
  { name: 'summary', as: 'lead', path: () => `/dives/${fixtures.finished.id}/summary`, ready: 'screen-title' },
  { name: 'gallery', as: 'lead', path: () => `/dives/${fixtures.finished.id}/gallery`, ready: 'screen-title' },
  { name: 'dive-settings', as: 'lead', path: () => `/dives/${fixtures.finished.id}/settings`, ready: 'screen-title' },
  { name: 'dive-taxa', as: 'lead', path: () => `/dives/${fixtures.finished.id}/taxa`, ready: 'taxa' },
  { name: 'dive-report', as: 'lead', path: () => `/dives/${fixtures.finished.id}/report`, ready: 'report-section-operations' },
  { name: 'day-report', as: 'lead', path: () => `/campaigns/${fixtures.campaign}/report/2026-05-13`, ready: 'report-section-operations' },
  { name: 'new-entry', as: 'lead', path: () => `/dives/${fixtures.finished.id}/new`, ready: 'observation-form' },
  { name: 'entry', as: 'lead', path: () => `/observations/${entryId}`, ready: 'observation-detail' },
  { name: 'search', as: 'lead', path: () => '/search?q=mat', ready: 'screen-title' },
  { name: 'account', as: 'lead', path: () => '/account', ready: 'screen-title' },
  { name: 'admin', as: 'admin', path: () => '/admin', ready: 'screen-title' },
  { name: 'mail-log', as: 'admin', path: () => '/admin/mail', ready: 'screen-title' },
];

// A theme changes colours, never sizes: each size is measured once, and each theme is seen once.
const combos = [
  ['phone', viewports.phone, 'light'],
  ['wide', viewports.wide, 'dark'],
] as const;

describe.each(combos)('every screen at %s size, %s', (size, viewport, scheme) => {
  const browsers: Partial<Record<Screen['as'], Browser>> = {};
  beforeAll(async () => {
    for (const who of ['lead', 'admin'] as const) {
      const b = await openBrowser(viewport);
      await b.page.emulateMedia({ colorScheme: scheme });
      await signInAs(b.page, server.url, `${who}@bathynote.test`);
      browsers[who] = b;
    }
  });
  afterAll(async () => {
    for (const b of Object.values(browsers)) await b?.close();
  });

  it.each(screens.map((s) => [s.name, s] as const))('%s keeps its text on screen and its header in order', async (name, s) => {
    const b = browsers[s.as]!;
    const { page } = b;
    const errorsBefore = b.errors.length;
    await page.goto(`${server.url}${s.path()}`);
    await page.getByTestId(s.ready).first().waitFor();
    // Fonts and late data settle before anything is measured.
    await page.evaluate(() => document.fonts.ready.then(() => undefined));
    await page
      .getByText('Loading', { exact: false })
      .first()
      .waitFor({ state: 'hidden', timeout: 10_000 })
      .catch(() => undefined);
    await page.screenshot({ path: path.join(shots, `all-${name}-${size}-${scheme}.png`), fullPage: true });

    expect(await textPastEdges(page)).toEqual([]);
    const header = await headerLayout(page);
    if (header.title) {
      expect(header.cut, `${name}: the screen title is cut off`).toBe(false);
      for (const button of header.buttons) expect(overlaps(header.title, button), `${name}: title under "${button.label}"`).toBe(false);
    }
    for (let i = 0; i < header.buttons.length; i++) {
      for (let j = i + 1; j < header.buttons.length; j++) {
        const [a, c] = [header.buttons[i]!, header.buttons[j]!];
        expect(overlaps(a, c), `${name}: "${a.label}" overlaps "${c.label}"`).toBe(false);
      }
    }
    expect(b.errors.slice(errorsBefore)).toEqual([]);
  });
});
