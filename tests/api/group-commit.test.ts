/**
 * New entries that arrive together share one commit, each in a savepoint of its own: a crowd of
 * sends, a few of them invalid, stores every valid one (201) and nothing of an invalid one (400).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { READERS_PER_TURN } from '../../server/services/live';
import { demoIds, emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: ReturnType<typeof demoIds>;
let dive: string;

beforeAll(async () => {
  t = await startTestServer();
  ids = demoIds(t.ctx.db);
  const lead = await t.signIn(emails.lead);
  // Tags outside the vocabulary are refused inside the entry's own transaction, after its row was written.
  expect((await lead.patch(`/api/campaigns/${ids.campaign2026}`).send({ allowFreeTags: false })).status).toBeLessThan(300);
  const planned = await lead.post(`/api/campaigns/${ids.campaign2026}/dives`).send({ number: 'GC-01', objectives: 'A crowd at once' });
  expect(planned.status).toBe(201);
  dive = planned.body.id as string;
});
afterAll(() => t.close());

describe('entries sent at the same moment', () => {
  it('are each stored or refused on their own', async () => {
    const writers = [emails.lead, emails.biologist, emails.archaeologist, emails.pilot, emails.guest];
    const agents = await Promise.all(writers.map((e) => t.signIn(e)));
    const sends = Array.from({ length: 50 }, (_, i) => {
      const kind = i % 10;
      // Every tenth refused by the database work (a tag outside the vocabulary), every tenth by the schema.
      const body =
        kind === 3
          ? { kind: 'biology', title: `Crowd ${i}`, tags: ['not-in-the-vocabulary'] }
          : kind === 7
            ? { title: `Crowd ${i}` }
            : { kind: 'biology', title: `Crowd ${i}`, clientRef: `crowd-send-${i}` };
      return agents[i % agents.length]!.post(`/api/dives/${dive}/observations`).send(body);
    });
    const before = { ...t.ctx.live.groupCommits };
    const answers = await Promise.all(sends);
    // Only the sends the schema let through reached the database's work.
    expect(t.ctx.live.groupCommits.changes - before.changes).toBe(45);

    answers.forEach((res, i) => {
      const kind = i % 10;
      expect(res.status, `send ${i}: ${JSON.stringify(res.body)}`).toBe(kind === 3 || kind === 7 ? 400 : 201);
      if (kind === 3 || kind === 7) expect(res.body.error.code).toBe('validation_failed');
    });
    const stored = t.ctx.db.$client
      .prepare("select title from observations where dive_id = ? and title like 'Crowd %' order by title")
      .pluck()
      .all(dive) as string[];
    const expected = answers.map((_, i) => i).filter((i) => i % 10 !== 3 && i % 10 !== 7);
    expect(stored.sort()).toEqual(expected.map((i) => `Crowd ${i}`).sort());
    // Each stored entry is whole: its revision and its live event were committed with it.
    const whole = t.ctx.db.$client
      .prepare(
        `select count(*) from observations o where o.dive_id = ? and o.title like 'Crowd %'
          and exists (select 1 from observation_revisions r where r.observation_id = o.id)
          and exists (select 1 from live_events e where e.type = 'observation.created' and json_extract(e.payload, '$.id') = o.id)`,
      )
      .pluck()
      .get(dive) as number;
    expect(whole).toBe(expected.length);
    const orphans = t.ctx.db.$client
      .prepare("select count(*) from live_events where json_extract(payload, '$.title') like 'Crowd %' and dive_id = ?")
      .pluck()
      .get(dive) as number;
    expect(orphans).toBe(expected.length);
  });

  it('share one commit when they arrive in the same turn, each failing on its own', async () => {
    const live = t.ctx.live;
    const before = { ...live.groupCommits };
    const heard: string[] = [];
    const stop = live.subscribeAll((e) => heard.push((e.payload as { note: string }).note));
    const changes = Array.from({ length: 10 }, (_, i) =>
      live.inGroupCommit(() =>
        // Staging writes the event's row: the change's own write, kept or rolled back with it.
        live.withEvents((_tx, stage) => {
          stage(ids.campaign2026, dive, 'dive.updated', { id: dive, note: `change ${i}` });
          if (i % 4 === 1) throw new Error(`change ${i} fails after staging`);
          return i;
        }),
      ),
    );
    // Nothing is told before the group has committed.
    expect(heard).toEqual([]);
    const settled = await Promise.allSettled(changes);
    stop();
    expect(live.groupCommits.groups - before.groups).toBe(1);
    expect(live.groupCommits.changes - before.changes).toBe(10);
    expect(settled.map((r) => r.status)).toEqual(settled.map((_, i) => (i % 4 === 1 ? 'rejected' : 'fulfilled')));
    expect(heard).toEqual(settled.flatMap((r, i) => (r.status === 'fulfilled' ? [`change ${i}`] : [])));
    const kept = t.ctx.db.$client
      .prepare("select count(*) from live_events where json_extract(payload, '$.note') like 'change %'")
      .pluck()
      .get() as number;
    expect(kept).toBe(heard.length);
  });

  it('are told to readers after their answers, in order, also when another change commits before the group is told', async () => {
    const live = t.ctx.live;
    const heard: number[] = [];
    const stop = live.subscribeAll((e) => heard.push(e.id));
    const stageOne = (note: string) => live.withEvents((_tx, stage) => stage(ids.campaign2026, dive, 'dive.updated', { note }).id);
    const order = await live
      .inGroupCommit(() => stageOne('grouped'))
      .then((grouped) => {
        // The group's answer comes first: its readers have not been told yet.
        const toldAtAnswer = heard.includes(grouped);
        return { grouped, toldAtAnswer, after: stageOne('right after') };
      });
    stop();
    expect(order.toldAtAnswer).toBe(false);
    expect(order.after).toBeGreaterThan(order.grouped);
    expect(heard).toEqual([order.grouped, order.after]);
  });

  it('are told to a crowd of readers a slice per turn, each reader hearing every commit in order', async () => {
    const live = t.ctx.live;
    const crowd = READERS_PER_TURN * 2 + 10;
    const heard: number[][] = Array.from({ length: crowd }, () => []);
    const stops = heard.map((mine) => live.subscribe(dive, (told) => mine.push(...told.events.map((e) => e.id))));
    const stageOne = (note: string) => live.withEvents((_tx, stage) => stage(ids.campaign2026, dive, 'dive.updated', { note }).id);
    const first = stageOne('sliced one');
    // Only the first slice of readers has been told when the change returns.
    expect(heard.filter((h) => h.length > 0)).toHaveLength(READERS_PER_TURN);
    const second = stageOne('sliced two');
    // A reader who leaves before its turn is not told.
    stops[crowd - 1]!();
    await new Promise((r) => setTimeout(r, 50));
    stops.forEach((stop) => stop());
    expect(heard.slice(0, -1)).toEqual(heard.slice(0, -1).map(() => [first, second]));
    expect(heard[crowd - 1]).toEqual([]);
  });

  it('answer a repeated send with the entry stored the first time, even within one group', async () => {
    const biologist = await t.signIn(emails.biologist);
    const body = { kind: 'biology', title: 'Sent twice at once', clientRef: 'twice-at-once' };
    const [a, b] = await Promise.all([
      biologist.post(`/api/dives/${dive}/observations`).send(body),
      biologist.post(`/api/dives/${dive}/observations`).send(body),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 201]);
    expect(a.body.id).toBe(b.body.id);
  });
});
