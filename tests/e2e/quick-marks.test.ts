import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, pageApi as api, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess();
});
afterAll(async () => {
  await server?.stop();
});

describe('quick marks on a dive under way', () => {
  let bio: Browser;
  let diveId: string;

  beforeAll(async () => {
    bio = await openBrowser(viewports.phone);
    await signInAs(bio.page, server.url, 'biologist@bathynote.test');
    // A campaign of the tests' own, whose lead defined a "Coral" mark, and a dive of it under way.
    const fixtures = await buildE2eFixtures(server.url, { underWay: true });
    diveId = fixtures.underWay!.id;
  });
  afterAll(async () => {
    await bio?.close();
  });

  const corals = async () =>
    (await api<{ items: { title: string }[] }>(bio.page, `/api/dives/${diveId}/observations?limit=100`)).items.filter(
      (i) => i.title === 'Coral',
    ).length;

  it('logs one entry for a double tap, counts a deliberate second tap, and undoes the last', async () => {
    const page = bio.page;
    await page.goto(`${server.url}/dives/${diveId}`);
    await page.getByTestId('live-status-live').waitFor();
    const log = page.getByTestId('dive-log').locator('[data-testid^="observation-"]').filter({ hasText: 'Coral' });

    await page.getByTestId('quick-mark-Coral').dblclick();
    const toast = page.getByTestId('toast');
    await toast.getByText('Coral logged').waitFor();
    await toast.getByTestId('toast-undo').waitFor();
    await toast.getByTestId('toast-action').getByText('Add details').waitFor();
    await log.first().waitFor();

    // Well after the double tap: a second coral, on purpose.
    await page.waitForTimeout(700);
    await page.getByTestId('quick-mark-Coral').click();
    await toast.getByText('Coral ×2').waitFor();
    await expect.poll(corals).toBeGreaterThanOrEqual(2);
    // Had the double tap logged twice, there would be three now.
    expect(await corals()).toBe(2);

    await toast.getByTestId('toast-undo').click();
    await expect.poll(corals).toBe(1);
    expect(bio.errors).toEqual([]);
  });
});
