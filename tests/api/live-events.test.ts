/**
 * One event path: a change and its live event are one transaction, and readers hear of it only
 * once it has committed. A change that fails part-way is heard by nobody, leaves no event row
 * behind and no entry, and the ids readers hear never repeat.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { demoIds, emails } from '../helpers/demo';
import { openSse, type SseClient } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: ReturnType<typeof demoIds>;
let dive: string;
let reader: SseClient;

const eventRows = () => t.ctx.db.$client.prepare('select count(*) as n from live_events').get() as { n: number };

beforeAll(async () => {
  t = await startTestServer();
  ids = demoIds(t.ctx.db);
  const pilot = await t.signIn(emails.pilot);
  const planned = await pilot.post(`/api/campaigns/${ids.campaign2026}/dives`).send({ number: 'EV-01', objectives: 'Event path' });
  expect(planned.status).toBe(201);
  dive = planned.body.id as string;
  reader = openSse(`${t.url}/api/dives/${dive}/stream`, { cookie: await t.sessionCookie(emails.guest) });
  expect(await reader.status).toBe(200);
});

afterAll(async () => {
  reader.close();
  await t.close();
});

describe('live events', () => {
  it('are never heard for a change that rolls back after staging its event', async () => {
    const biologist = await t.signIn(emails.biologist);
    const first = await biologist.post(`/api/dives/${dive}/observations`).send({ kind: 'biology', title: 'Before the failure' });
    expect(first.status).toBe(201);
    const heardFirst = await reader.next((e) => e.event === 'observation.created' && JSON.parse(e.data).id === first.body.id);

    // The event row is the last thing a new entry writes; make SQLite refuse it for one title,
    // so the change fails after its entry, its revision and its event were all staged.
    t.ctx.db.$client.exec(`create trigger refuse_poison before insert on live_events
      when json_extract(new.payload, '$.title') = 'Poison'
      begin select raise(abort, 'refused for the test'); end`);
    const rowsBefore = eventRows().n;
    const failed = await biologist.post(`/api/dives/${dive}/observations`).send({ kind: 'biology', title: 'Poison' });
    // An edit whose event cannot be written is not kept either: the edit and its event are one commit.
    const failedEdit = await biologist.patch(`/api/observations/${first.body.id}`).send({ version: first.body.version, title: 'Poison' });
    t.ctx.db.$client.exec('drop trigger refuse_poison');
    expect(failedEdit.status).toBe(500);
    const unchanged = await biologist.get(`/api/observations/${first.body.id}`);
    expect(unchanged.body.title).toBe('Before the failure');
    expect(unchanged.body.version).toBe(first.body.version);
    expect(failed.status).toBe(500);
    expect(failed.body.error.code).toBe('internal');
    expect(eventRows().n).toBe(rowsBefore);
    const stored = t.ctx.db.$client.prepare("select count(*) as n from observations where title = 'Poison'").get() as { n: number };
    expect(stored.n).toBe(0);

    const after = await biologist.post(`/api/dives/${dive}/observations`).send({ kind: 'biology', title: 'After the failure' });
    expect(after.status).toBe(201);
    const heardAfter = await reader.next((e) => e.event === 'observation.created' && JSON.parse(e.data).id === after.body.id);

    // Events are told in order, so by the time the later one arrives the failed one would have too.
    const created = reader.events.filter((e) => e.event === 'observation.created').map((e) => JSON.parse(e.data).title as string);
    expect(created).not.toContain('Poison');
    const heardIds = reader.events.map((e) => Number(e.id));
    expect(new Set(heardIds).size).toBe(heardIds.length);
    expect(Number(heardAfter.id)).toBeGreaterThan(Number(heardFirst.id));
  });

  it('are not told to readers while the change is still inside its transaction', () => {
    const heard: number[] = [];
    const stop = t.ctx.live.subscribeAll((e) => heard.push(e.id));
    try {
      const staged = t.ctx.live.withEvents((tx, stage) => {
        const event = stage(ids.campaign2026, dive, 'dive.updated', { id: dive, note: 'staged' });
        // Nested work joins the outer transaction and waits for its commit too.
        t.ctx.live.withEvents((_inner, stageInner) => stageInner(ids.campaign2026, dive, 'dive.updated', { id: dive, note: 'inner' }));
        expect(heard).toEqual([]);
        return event;
      });
      expect(heard).toHaveLength(2);
      expect(heard[0]).toBe(staged.id);

      heard.length = 0;
      expect(() =>
        t.ctx.live.withEvents((_tx, stage) => {
          stage(ids.campaign2026, dive, 'dive.updated', { id: dive, note: 'rolled back' });
          throw new Error('the change fails after staging its event');
        }),
      ).toThrow('the change fails');
      expect(heard).toEqual([]);
    } finally {
      stop();
    }
  });

  it('tell a restored entry as observation.restored, not as a new one', async () => {
    const biologist = await t.signIn(emails.biologist);
    const lead = await t.signIn(emails.lead);
    const entry = await biologist.post(`/api/dives/${dive}/observations`).send({ kind: 'biology', title: 'Retire and restore me' });
    expect((await biologist.delete(`/api/observations/${entry.body.id}`)).status).toBe(200);
    await reader.next((e) => e.event === 'observation.retired' && JSON.parse(e.data).id === entry.body.id);
    expect((await lead.post(`/api/observations/${entry.body.id}/restore`)).status).toBe(200);
    const restored = await reader.next((e) => e.event === 'observation.restored');
    const payload = JSON.parse(restored.data);
    expect(payload.id).toBe(entry.body.id);
    expect(payload.retired).toBe(false);
    expect(reader.events.filter((e) => e.event === 'observation.created' && JSON.parse(e.data).id === entry.body.id)).toHaveLength(1);
  });
});
