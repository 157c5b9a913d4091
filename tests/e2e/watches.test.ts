/**
 * Watches in the browser: the demo's plan is there, the lead sets another at a wide screen, the
 * dive log shows who is on watch, someone of the incoming watch acknowledges the handover on a
 * phone, and a note written at a real change of watch reaches an open dive log at once.
 */
import path from 'node:path';

import Database from 'better-sqlite3';
import { DateTime } from 'luxon';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { openBrowser, pageApi, signInAs, viewports } from '../helpers/chromium';
import { textPastEdges } from '../helpers/layout';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

let server: ServerProcess;

beforeAll(async () => {
  server = await startServerProcess({ BATHYNOTE_DEMO_WATCHES: '1' });
});
afterAll(async () => {
  await server?.stop();
});

type Turn = { name: string; start: string; end: string; members: { id: string; name: string }[] };

async function demoCampaign(page: Page) {
  const campaigns = await pageApi<{ id: string; name: string }[]>(page, '/api/campaigns');
  const campaign = campaigns.find((c) => c.name === 'Varn Shoal 2026')!;
  const dives = await pageApi<{ id: string; number: string }[]>(page, `/api/campaigns/${campaign.id}/dives`);
  return { campaignId: campaign.id, diveId: dives.find((d) => d.number === 'VS-02')!.id };
}

describe('watches', () => {
  it('lets the lead set a plan round the clock at a wide screen, and the dive log shows who is on watch', async () => {
    const lead = await openBrowser(viewports.wide);
    try {
      const { page, errors } = lead;
      await signInAs(page, server.url, 'lead@bathynote.test');
      await page.getByTestId('campaign-list').getByText('Varn Shoal 2026').click();
      await page.getByTestId('campaign-watches').click();
      await page.getByTestId('watch-plan-editor').waitFor();
      // The demo's own plan comes first: six four-hour watches, with someone on watch now.
      await page.getByTestId('watch-row-5').waitFor();
      expect(await page.getByTestId('watch-row-6').count()).toBe(0);
      expect(await page.getByTestId('on-watch').textContent()).toMatch(/On watch: \S/);
      for (let i = 5; i >= 0; i--) await page.getByTestId(`watch-remove-${i}`).click();
      expect(await page.getByTestId('watch-row-0').count()).toBe(0);
      // Two watches cover the whole day, so whatever the time the pilot is on watch.
      const watches: [string, string, string][] = [
        ['Day watch', '08:00', '20:00'],
        ['Night watch', '20:00', '08:00'],
      ];
      for (const [i, [name, start, end]] of watches.entries()) {
        await page.getByTestId('watch-add').click();
        await page.getByTestId(`watch-name-${i}`).fill(name);
        await page.getByTestId(`watch-start-${i}`).fill(start);
        await page.getByTestId(`watch-end-${i}`).fill(end);
        await page.getByTestId(`watch-member-${i}-pilot@bathynote.test`).click();
      }
      await page.getByTestId('watch-member-1-biologist@bathynote.test').click();
      await page.getByTestId('watch-mail').click();
      await page.getByTestId('watch-save').click();
      await page.getByTestId('watch-saved').waitFor();
      await expect.poll(() => page.getByTestId('on-watch').textContent()).toMatch(/On watch: (Day|Night) watch/);
      expect(await page.getByTestId('on-watch-members').textContent()).toContain('Dev Pillai');

      // An overlap is refused before it is sent.
      await page.getByTestId('watch-end-0').fill('21:00');
      expect(await page.getByTestId('watch-row-1').textContent()).toContain('overlaps');
      expect(await page.getByTestId('watch-save').isDisabled()).toBe(true);

      const { diveId } = await demoCampaign(page);
      await page.goto(`${server.url}/dives/${diveId}`);
      await page.getByTestId('on-watch').waitFor();
      // A reload first shows the answers kept on the device, then asks again: the plan kept may be
      // the one from before the save (the device's copy is written at most once a second).
      await expect.poll(() => page.getByTestId('on-watch-members').textContent()).toContain('Dev Pillai');
      expect(await textPastEdges(page)).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await lead.close();
    }
  });

  it('shows the handover to the incoming watch on a phone, who acknowledges it', async () => {
    const pilot = await openBrowser(viewports.phone);
    try {
      const { page, errors } = pilot;
      await signInAs(page, server.url, 'pilot@bathynote.test');
      const { campaignId, diveId } = await demoCampaign(page);
      const plan = await pageApi<{ onWatch: Turn }>(page, `/api/campaigns/${campaignId}/watches`);
      // The scheduler writes a note at the next change of watch; this one stands for the last change,
      // written as it would have been, so the test need not wait hours for the clock.
      const db = new Database(path.join(server.dir, 'bathynote.db'));
      try {
        db.pragma('busy_timeout = 5000');
        const content = {
          entries: { total: 2, byKind: { biology: 1, archaeology: 0, environment: 0, operations: 1 }, latest: [] },
          openItems: [
            {
              kind: 'operations-fault',
              observationId: 'none',
              title: 'Manipulator jaw sticks',
              detail: 'Operations entry marked as a fault',
            },
          ],
          dive: null,
        };
        const outgoing = { ...plan.onWatch, name: 'Earlier watch', members: [] };
        db.prepare(
          'insert into handovers (id, campaign_id, change_at, outgoing, incoming, content, created_at) values (?, ?, ?, ?, ?, ?, ?)',
        ).run(
          crypto.randomUUID(),
          campaignId,
          Date.parse(plan.onWatch.start),
          JSON.stringify(outgoing),
          JSON.stringify(plan.onWatch),
          JSON.stringify(content),
          Date.now(),
        );
      } finally {
        db.close();
      }
      await page.goto(`${server.url}/dives/${diveId}`);
      const card = page.getByTestId('handover-card');
      await card.waitFor();
      expect(await card.textContent()).toContain('Manipulator jaw sticks');
      // The note and the watch line fit the phone's width (the dive header's own buttons are not this test's).
      for (const id of ['handover-card', 'on-watch']) {
        const box = (await page.getByTestId(id).boundingBox())!;
        expect(box.x).toBeGreaterThanOrEqual(0);
        expect(box.x + box.width).toBeLessThanOrEqual(viewports.phone.width);
      }
      const past = await textPastEdges(page);
      expect(past.filter((t) => /Manipulator|watch|Acknowledge|Open items/.test(t))).toEqual([]);
      await page.getByTestId('handover-acknowledge').click();
      await page.getByTestId('handover-acknowledged').waitFor();
      expect(await page.getByTestId('handover-acknowledged').textContent()).toContain('Acknowledged by Dev Pillai');
      expect(await page.getByTestId('on-watch-members').textContent()).toContain('Dev Pillai');
      expect(errors).toEqual([]);
    } finally {
      await pilot.close();
    }
  });

  it('keeps the plan and the acknowledged note in the campaign record, readable on a phone', async () => {
    const lead = await openBrowser(viewports.phone);
    try {
      const { page, errors } = lead;
      await signInAs(page, server.url, 'lead@bathynote.test');
      const { campaignId } = await demoCampaign(page);
      await page.goto(`${server.url}/campaigns/${campaignId}/watches`);
      await page.getByTestId('watch-plan-editor').waitFor();
      expect(await page.getByTestId('watch-name-1').inputValue()).toBe('Night watch');
      const note = page.getByTestId('handover-list').getByTestId('handover-card');
      await note.waitFor();
      expect(await note.textContent()).toContain('Acknowledged by Dev Pillai');
      // Mailed again to each person of the watch the note was handed to (the one on now).
      const plan = await pageApi<{ onWatch: Turn }>(page, `/api/campaigns/${campaignId}/watches`);
      const n = plan.onWatch.members.length;
      await note.getByTestId('handover-mail').click();
      await note.getByTestId('handover-mailed').waitFor();
      expect(await note.getByTestId('handover-mailed').textContent()).toBe(`Queued ${n} mail${n === 1 ? '' : 's'}`);
      for (const id of ['watch-row-0', 'watch-row-1', 'handover-list']) {
        const box = (await page.getByTestId(id).boundingBox())!;
        expect(box.x + box.width).toBeLessThanOrEqual(viewports.phone.width);
      }
      expect(await textPastEdges(page)).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await lead.close();
    }
  });

  it('shows a note written at a change of watch at once in the incoming watch’s open dive log, and its acknowledgment too', async () => {
    const lead = await openBrowser(viewports.wide);
    const pilot = await openBrowser(viewports.phone);
    try {
      await signInAs(lead.page, server.url, 'lead@bathynote.test');
      await signInAs(pilot.page, server.url, 'pilot@bathynote.test');
      const { campaignId, diveId } = await demoCampaign(lead.page);
      const { timeZone } = await pageApi<{ timeZone: string }>(lead.page, `/api/campaigns/${campaignId}/watches`);
      const me = await pageApi<{ user: { id: string } }>(pilot.page, '/api/me');
      // The server checks for a change of watch on each whole minute: the plan hands over to the
      // pilot's watch at the next one at least 40 s off.
      let change = Math.ceil(Date.now() / 60_000) * 60_000;
      if (change - Date.now() < 40_000) change += 60_000;
      const hhmm = (ms: number) => DateTime.fromMillis(ms, { zone: timeZone }).toFormat('HH:mm');
      const hour = 3_600_000;
      const saved = await pageApi<{ watches: unknown[] }>(lead.page, `/api/campaigns/${campaignId}/watches`, 'PUT', {
        watches: [
          { name: 'Before the change', start: hhmm(change - 4 * hour), end: hhmm(change), memberIds: [] },
          { name: 'After the change', start: hhmm(change), end: hhmm(change + 4 * hour), memberIds: [me.user.id] },
        ],
      });
      expect(saved.watches).toHaveLength(2);
      // The dive log is opened 35 s before the change, so its own once-a-minute refetch comes well
      // after the deadlines below: only the live stream can bring the note in time.
      await new Promise((r) => setTimeout(r, Math.max(0, change - 35_000 - Date.now())));
      const { page, errors } = pilot;
      await page.goto(`${server.url}/dives/${diveId}`);
      await page.getByTestId('on-watch').waitFor();
      expect(await page.getByTestId('on-watch').textContent()).toContain('Before the change');
      expect(await page.getByTestId('handover-card').count()).toBe(0);

      await page.getByTestId('handover-acknowledge').waitFor({ timeout: change + 15_000 - Date.now() });
      expect(Date.now()).toBeLessThan(change + 15_000);
      expect(await page.getByTestId('on-watch').textContent()).toContain('After the change');

      const notes = await pageApi<{ items: { id: string; changeAt: string }[] }>(
        lead.page,
        `/api/campaigns/${campaignId}/handovers?limit=1`,
      );
      expect(notes.items[0]!.changeAt).toBe(new Date(change).toISOString());
      await pageApi(lead.page, `/api/handovers/${notes.items[0]!.id}/acknowledge`, 'POST');
      const acknowledged = page.getByTestId('handover-acknowledged');
      await acknowledged.waitFor({ timeout: 8_000 });
      expect(await acknowledged.textContent()).toContain('Acknowledged by Ada Lumen');
      expect(errors).toEqual([]);
      expect(lead.errors).toEqual([]);
    } finally {
      await lead.close();
      await pilot.close();
    }
  }, 180_000);
});
