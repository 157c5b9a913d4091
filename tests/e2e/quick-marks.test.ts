import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, pageApi as api, signInAs, viewports, type Browser } from '../helpers/chromium';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess();
});
afterAll(async () => {
  await server?.stop();
});

describe('quick marks on a dive under way', () => {
  let lead: Browser;
  let bio: Browser;
  let diveId: string;

  beforeAll(async () => {
    [lead, bio] = await Promise.all([openBrowser(viewports.phone), openBrowser(viewports.phone)]);
    await Promise.all([signInAs(lead.page, server.url, 'lead@bathynote.test'), signInAs(bio.page, server.url, 'biologist@bathynote.test')]);
    // A dive of its own, launched now, so the demo's finished dives stay as they are.
    const campaigns = await api<{ id: string; name: string }[]>(lead.page, '/api/campaigns');
    const campaign = campaigns.find((c) => c.name === 'Varn Shoal 2026')!;
    const dive = await api<{ id: string }>(lead.page, `/api/campaigns/${campaign.id}/dives`, 'POST', { number: 'QM-01' });
    await api(lead.page, `/api/dives/${dive.id}/phases`, 'POST', { phase: 'launch' });
    diveId = dive.id;
  });
  afterAll(async () => {
    await Promise.all([lead?.close(), bio?.close()]);
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
