import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';

import { openBrowser, pageApi as api, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { underWay: true });
});
afterAll(async () => {
  await server?.stop();
});

async function openDive(page: Page, number: string): Promise<string> {
  await page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
  await page.getByTestId(`dive-${number}`).click();
  await page.getByTestId('live-status-live').waitFor();
  return /\/dives\/([^/?#]+)/.exec(page.url())![1]!;
}

type Entry = { id: string; version: number; title: string; note: string; depth: number | null; depthSource: string | null };

async function openEditor(page: Page, id: string) {
  await page.goto(`${server.url}/observations/${id}/edit`);
  await page.getByTestId('observation-editor').waitFor();
}

describe.each([
  ['phone', viewports.phone],
  ['wide', viewports.wide],
] as const)('two people editing one entry at %s size', (size, viewport) => {
  let a: Browser;
  let b: Browser;
  let diveId: string;

  beforeAll(async () => {
    [a, b] = await Promise.all([openBrowser(viewport), openBrowser(viewport)]);
    await Promise.all([signInAs(a.page, server.url, 'biologist@bathynote.test'), signInAs(b.page, server.url, 'lead@bathynote.test')]);
    diveId = await openDive(a.page, fixtures.finished.number);
  });
  afterAll(async () => {
    await Promise.all([a?.close(), b?.close()]);
  });

  const logEntry = (title: string) =>
    api<Entry>(a.page, `/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title, note: 'First look.' });

  it('keeps both changes without a question when each changed a different field', async () => {
    const entry = await logEntry(`Brisingid on the rail (${size})`);
    await Promise.all([openEditor(a.page, entry.id), openEditor(b.page, entry.id)]);
    await a.page.getByTestId('field-note').fill('Five arms raised into the current.');
    await b.page.getByTestId('field-depth').fill('587.5');
    await b.page.getByTestId('save-observation').click();
    await b.page.getByTestId('observation-detail').waitFor();
    await a.page.getByTestId('save-observation').click();
    await a.page.getByTestId('observation-detail').waitFor();

    const stored = await api<Entry>(a.page, `/api/observations/${entry.id}`);
    expect(stored.note).toBe('Five arms raised into the current.');
    expect(stored.depth).toBe(587.5);
    expect(stored.depthSource).toBe('manual');
    expect(await a.page.getByTestId('edit-conflict').count()).toBe(0);
    expect(a.errors).toEqual([]);
    expect(b.errors).toEqual([]);
  });

  it('asks only about the field both changed, says who changed it, and keeps the other change', async () => {
    const entry = await logEntry(`Squat lobster under a plank (${size})`);
    await Promise.all([openEditor(a.page, entry.id), openEditor(b.page, entry.id)]);
    await a.page.getByTestId('field-title').fill(`Squat lobster, claws out (${size})`);
    await a.page.getByTestId('field-note').fill('Two of them.');
    await b.page.getByTestId('field-title').fill(`Galatheid under a plank (${size})`);
    await b.page.getByTestId('field-depth').fill('601');
    await b.page.getByTestId('save-observation').click();
    await b.page.getByTestId('observation-detail').waitFor();

    const panel = a.page.getByTestId('edit-conflict');
    await panel.waitFor();
    await a.page.getByTestId('edit-conflict-title').waitFor();
    expect(await panel.locator('[data-testid^="edit-conflict-choose-"][role="radiogroup"]').count()).toBe(1);
    expect(await a.page.getByTestId('edit-conflict-note').count()).toBe(0);
    expect(await a.page.getByTestId('edit-conflict-depth').count()).toBe(0);
    await expect.poll(() => a.page.getByTestId('edit-conflict-by').textContent()).toContain('Ada Lumen');
    expect(await a.page.getByTestId('edit-conflict-theirs-title').textContent()).toBe(`Galatheid under a plank (${size})`);
    expect(await a.page.getByTestId('edit-conflict-mine-title').textContent()).toBe(`Squat lobster, claws out (${size})`);

    await a.page.getByTestId('edit-conflict-choose-title-theirs').click();
    await a.page.getByTestId('edit-conflict-keep-mine').click();
    await a.page.getByTestId('observation-detail').waitFor();
    const stored = await api<Entry>(a.page, `/api/observations/${entry.id}`);
    expect(stored.title).toBe(`Galatheid under a plank (${size})`);
    expect(stored.note).toBe('Two of them.');
    expect(stored.depth).toBe(601);
    expect(a.errors).toEqual([]);
  });
});

describe('entries kept by an earlier version of the app', () => {
  it('are moved from the former storage key into the send queue and sent', async () => {
    const screen = await openBrowser(viewports.phone);
    try {
      await signInAs(screen.page, server.url, 'biologist@bathynote.test');
      const diveId = await openDive(screen.page, fixtures.underWay!.number);
      const title = 'Kept on the device before the update';
      await screen.page.evaluate(
        ({ diveId, title }) => {
          const kept = [
            {
              clientRef: 'kept-before-update-0001',
              diveId,
              body: { kind: 'biology', title, observedAt: new Date().toISOString() },
              queuedAt: new Date().toISOString(),
              attempts: 1,
              lastError: 'No connection',
            },
          ];
          localStorage.setItem('bathynote.outbox', JSON.stringify(kept));
        },
        { diveId, title },
      );
      await screen.page.reload();
      await screen.page.getByTestId('dive-log').locator('[data-testid^="observation-"]').getByText(title).waitFor();
      const keys = await screen.page.evaluate(() => [
        localStorage.getItem('bathynote.outbox'),
        localStorage.getItem('bathynote.send-queue'),
      ]);
      expect(keys).toEqual([null, '[]']);
      expect(screen.errors).toEqual([]);
    } finally {
      await screen.close();
    }
  });
});
