import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, pageApi as api, signInAs, viewports, type Browser } from '../helpers/chromium';
import { buildE2eFixtures, choose, type E2eFixtures } from '../helpers/e2e-fixtures';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;
/** A finished dive of the tests' own (2026-05-13, 17:40 to 23:05 UTC) with a telemetry log. */
let fixtures: E2eFixtures;

beforeAll(async () => {
  server = await startServerProcess();
  fixtures = await buildE2eFixtures(server.url, { telemetry: true });
});
afterAll(async () => {
  await server?.stop();
});

describe('the entry form at phone size', () => {
  let bio: Browser;
  let diveId: string;

  beforeAll(async () => {
    bio = await openBrowser(viewports.phone);
    await signInAs(bio.page, server.url, 'biologist@bathynote.test');
    await bio.page.getByTestId('campaign-list').getByText(fixtures.campaignName).click();
    await bio.page.getByTestId(`dive-${fixtures.finished.number}`).click();
    await bio.page.getByTestId('dive-log').waitFor();
    diveId = /\/dives\/([^/?#]+)/.exec(bio.page.url())![1]!;
  });
  afterAll(async () => {
    await bio?.close();
  });

  it('starts a finished dive’s entry with no time, shows the dive’s window, and still offers Now', async () => {
    const page = bio.page;
    await page.goto(`${server.url}/dives/${diveId}/new`);
    await page.getByTestId('observation-form').waitFor();
    expect(await page.getByTestId('field-time').inputValue()).toBe('');
    expect(await page.getByTestId('dive-window').textContent()).toBe(
      `Dive ${fixtures.finished.number}: launched 2026-05-13 17:40:00Z, on deck 2026-05-13 23:05:00Z.`,
    );
    await page.getByTestId('time-now').click();
    expect(await page.getByTestId('field-time').inputValue()).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}$/);
    // Now is months after this dive: the form says so before anything is saved.
    await page.getByTestId('time-outside-dive').waitFor();
    expect(bio.errors).toEqual([]);
  });

  it('takes a field’s error away as soon as the field is fixed', async () => {
    const page = bio.page;
    await page.goto(`${server.url}/dives/${diveId}/new`);
    // The dive's window, drawn from the dive's data, means the form is live.
    await page.getByTestId('dive-window').getByText(`Dive ${fixtures.finished.number}:`).waitFor();
    await choose(page.getByTestId('field-kind-biology'));
    await page.getByTestId('field-title').fill('Holothurian on the mound');
    await page.getByTestId('field-time').fill('2026-13-13 19:00:00');
    await page.getByTestId('field-depth').fill('deep');
    await page.getByTestId('save-observation').click();
    await page.getByTestId('field-time-error').waitFor();
    await page.getByTestId('field-depth-error').waitFor();
    await page.getByTestId('field-time').fill('2026-05-13 19:00:00');
    expect(await page.getByTestId('field-time-error').count()).toBe(0);
    // The other field's error stays until that field is fixed.
    expect(await page.getByTestId('field-depth-error').count()).toBe(1);
    await page.getByTestId('field-depth').fill('597');
    expect(await page.getByTestId('field-depth-error').count()).toBe(0);
  });

  it('shows the current measured values in the edit form and where they came from, with Cancel', async () => {
    const page = bio.page;
    // Logged inside the dive with no depth of its own: the server fills it from the telemetry log.
    const entry = await api<{ id: string; depth: number | null; depthSource: string | null }>(
      page,
      `/api/dives/${diveId}/observations`,
      'POST',
      {
        kind: 'biology',
        title: 'Brittle star on a jar',
        observedAt: '2026-05-13T19:30:00.000Z',
      },
    );
    expect(entry.depthSource).toBe('telemetry');
    await page.goto(`${server.url}/observations/${entry.id}`);
    await page.getByTestId('observation-detail').getByText('Brittle star on a jar').first().waitFor();
    await page.getByTestId('edit').click();
    await page.getByTestId('observation-editor').waitFor();
    expect(await page.getByTestId('field-depth').inputValue()).toBe(String(entry.depth));
    expect(await page.getByTestId('field-depth-hint').textContent()).toContain('From the telemetry log');
    await page.getByTestId('field-depth').fill('600');
    expect(await page.getByTestId('field-depth-hint').textContent()).toBe('Typed by hand.');
    await page.getByTestId('cancel-edit').click();
    await page.getByTestId('observation-detail').waitFor();
    const stored = await api<{ depth: number; depthSource: string }>(page, `/api/observations/${entry.id}`);
    expect(stored).toMatchObject({ depth: entry.depth, depthSource: 'telemetry' });
    expect(bio.errors).toEqual([]);
  });

  it('warns of a time outside the dive, keeps the entry and marks it, with its date, in the log', async () => {
    const page = bio.page;
    await page.goto(`${server.url}/dives/${diveId}/new`);
    // The dive's window, drawn from the dive's data, means the form is live.
    await page.getByTestId('dive-window').getByText(`Dive ${fixtures.finished.number}:`).waitFor();
    await choose(page.getByTestId('field-kind-biology'));
    await page.getByTestId('field-title').fill('Logged from the video months later');
    await page.getByTestId('field-time').fill('2026-11-30 09:15:00');
    await page.getByTestId('time-outside-dive').waitFor();
    // Back inside the dive's window, the warning goes and the window is shown instead.
    await page.getByTestId('field-time').fill('2026-05-13 19:15:00');
    expect(await page.getByTestId('time-outside-dive').count()).toBe(0);
    await page.getByTestId('dive-window').waitFor();
    await page.getByTestId('field-time').fill('2026-11-30 09:15:00');
    await page.getByTestId('save-observation').click();
    const card = page
      .getByTestId('dive-log')
      .locator('[data-testid^="observation-"]')
      .filter({ hasText: 'Logged from the video months later' })
      .first();
    await card.waitFor();
    await card.getByTestId('entry-outside-dive').waitFor();
    expect(await card.getByTestId('observation-time').first().textContent()).toBe('2026-11-30 09:15:00Z');

    // The summary lists it apart, and the depth profile leaves it out rather than stretch its time axis to November.
    const id = (await card.getAttribute('data-testid'))!.replace('observation-', '');
    await page.goto(`${server.url}/dives/${diveId}/summary`);
    await page.getByTestId('depth-profile-svg').waitFor();
    await page.getByTestId('outside-entries').getByTestId(`outside-entry-${id}`).waitFor();
    expect(await page.getByTestId(`profile-marker-${id}`).count()).toBe(0);
    expect(bio.errors).toEqual([]);
  });

  it('says a finished dive has ended and is logged from the video, not that it is live', async () => {
    const page = bio.page;
    await page.goto(`${server.url}/dives/${diveId}`);
    const ended = page.getByTestId('dive-ended');
    await ended.waitFor();
    expect(await ended.textContent()).toMatch(/^Dive ended \d\d:\d\d UTC — logging from video$/);
    await page.getByTestId('live-status-live').waitFor();
    expect(await page.getByTestId('live-status').textContent()).toBe('Updates on');
    expect(bio.errors).toEqual([]);
  });
});
