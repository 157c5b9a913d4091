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

  it('is never marked for a dive with neither phases nor a planned start', async () => {
    const dive = await plan('OW-03');
    expect((await logAt(dive, '2020-01-01T00:00:00.000Z')).outsideDive).toBe(false);
  });
});
