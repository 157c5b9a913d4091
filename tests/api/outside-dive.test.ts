/**
 * An entry's time belongs to its dive: one logged outside the dive's window (an hour either side
 * of launch and on deck, or a day either side of a planned start) is taken, since logging from the
 * video after the dive is real work, but marked `outsideDive`.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { demoIds, emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let campaign: string;

beforeAll(async () => {
  t = await startTestServer();
  campaign = demoIds(t.ctx.db).campaign2026;
});
afterAll(() => t.close());

async function plan(number: string, body: Record<string, unknown> = {}) {
  const pilot = await t.signIn(emails.pilot);
  const res = await pilot.post(`/api/campaigns/${campaign}/dives`).send({ number, objectives: 'Window', ...body });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

async function logAt(dive: string, observedAt: string) {
  const res = await (
    await t.signIn(emails.biologist)
  )
    .post(`/api/dives/${dive}/observations`)
    .send({ kind: 'biology', title: 'Timed', observedAt });
  expect(res.status).toBe(201);
  return res.body as { id: string; outsideDive: boolean };
}

describe('an entry outside its dive', () => {
  it('is taken and marked, by the phases of a launched dive', async () => {
    const dive = await plan('OW-01');
    const pilot = await t.signIn(emails.pilot);
    await pilot.post(`/api/dives/${dive}/phases`).send({ phase: 'launch', at: '2026-05-20T08:00:00.000Z' });
    await pilot.post(`/api/dives/${dive}/phases`).send({ phase: 'on-deck', at: '2026-05-20T14:00:00.000Z' });
    expect((await logAt(dive, '2026-05-20T10:00:00.000Z')).outsideDive).toBe(false);
    // An hour's grace either side.
    expect((await logAt(dive, '2026-05-20T07:30:00.000Z')).outsideDive).toBe(false);
    expect((await logAt(dive, '2026-05-20T14:59:00.000Z')).outsideDive).toBe(false);
    const late = await logAt(dive, '2026-05-21T10:00:00.000Z');
    expect(late.outsideDive).toBe(true);
    const read = await (await t.signIn(emails.guest)).get(`/api/observations/${late.id}`);
    expect(read.body.outsideDive).toBe(true);
    const log = await (await t.signIn(emails.guest)).get(`/api/dives/${dive}/observations`);
    expect(log.body.items.filter((o: { outsideDive: boolean }) => o.outsideDive)).toHaveLength(1);
  });

  it('is judged by the planned start of a dive not yet launched, a day either side', async () => {
    const dive = await plan('OW-02', { plannedStartAt: '2026-06-01T08:00:00.000Z' });
    expect((await logAt(dive, '2026-06-01T20:00:00.000Z')).outsideDive).toBe(false);
    expect((await logAt(dive, '2026-06-03T08:00:00.000Z')).outsideDive).toBe(true);
  });

  it('is listed apart by the summary, which counts only the dive’s own entries', async () => {
    const dive = await plan('OW-04');
    const pilot = await t.signIn(emails.pilot);
    await pilot.post(`/api/dives/${dive}/phases`).send({ phase: 'launch', at: '2026-05-22T08:00:00.000Z' });
    await pilot.post(`/api/dives/${dive}/phases`).send({ phase: 'on-deck', at: '2026-05-22T14:00:00.000Z' });
    const inside = await logAt(dive, '2026-05-22T10:00:00.000Z');
    const late = await logAt(dive, '2026-09-14T10:00:00.000Z');
    const typed = await (await t.signIn(emails.biologist)).patch(`/api/observations/${late.id}`).send({ version: 1, depth: 2500 });
    expect(typed.status).toBe(200);
    const summary = (await (await t.signIn(emails.guest)).get(`/api/dives/${dive}/summary`)).body as {
      maxDepth: number | null;
      stats: { entryCount: number; entriesByKind: { label: string; count: number }[] };
      observations: { id: string; outsideDive: boolean }[];
    };
    expect(summary.observations.map((o) => [o.id, o.outsideDive])).toEqual([
      [inside.id, false],
      [late.id, true],
    ]);
    expect(summary.stats.entryCount).toBe(1);
    expect(summary.stats.entriesByKind).toEqual([{ label: 'biology', count: 1 }]);
    // The late entry's typed depth does not become the dive's deepest.
    expect(summary.maxDepth).toBeNull();
  });

  it('is never marked for a dive with neither phases nor a planned start', async () => {
    const dive = await plan('OW-03');
    expect((await logAt(dive, '2020-01-01T00:00:00.000Z')).outsideDive).toBe(false);
  });
});
