import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { handoverListSchema, handoverSchema, watchPlanSchema, type Handover } from '@/lib/schemas';
import { watchStandersDuring } from '@/server/services/watches';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { openSse, type SseClient } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;
let diveId: string;
// A guest reading the dive's log, who hears of each note as it is written or acknowledged.
let reader: SseClient;
const as = (who: keyof typeof emails) => t.signIn(emails[who]);

// The fixture campaign's display zone is Europe/Lisbon, on UTC+0 in November (IANA tz database).
const plan = () => ({
  mailHandovers: true,
  watches: [
    { name: 'Morning', start: '04:00', end: '08:00', memberIds: [ids.userId(emails.biologist), ids.userId(emails.archaeologist)] },
    { name: 'Forenoon', start: '08:00', end: '12:00', memberIds: [ids.userId(emails.pilot)] },
  ],
});

async function log(by: keyof typeof emails, body: Record<string, unknown>) {
  const res = await (await as(by)).post(`/api/dives/${diveId}/observations`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; version: number };
}

beforeAll(async () => {
  t = await startTestServer();
  // Only the ticks the tests make: the real clock must not write notes of its own.
  t.ctx.handovers.stop();
  ids = await buildFixtures(t);
  const lead = await as('lead');
  const dive = await lead.post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'W-01' });
  expect(dive.status, JSON.stringify(dive.body)).toBe(201);
  diveId = dive.body.id as string;
  for (const [phase, at] of [
    ['launch', '2026-11-20T05:00:00.000Z'],
    ['on-bottom', '2026-11-20T06:00:00.000Z'],
  ]) {
    const res = await lead.post(`/api/dives/${diveId}/phases`).send({ phase, at });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
  }
  reader = openSse(`${t.url}/api/dives/${diveId}/stream`, { cookie: await t.sessionCookie(emails.guest) });
  expect(await reader.status).toBe(200);
});
afterAll(async () => {
  reader.close();
  await t.close();
});

const heard = (type: string) => reader.events.filter((e) => e.event === type).map((e) => JSON.parse(e.data) as Handover);

describe('the watch plan', () => {
  it('is empty until a lead sets it, and only a lead may set it', async () => {
    const empty = watchPlanSchema.parse((await (await as('guest')).get(`/api/campaigns/${ids.campaign}/watches`)).body);
    expect(empty.watches).toEqual([]);
    expect(empty.onWatch).toBeNull();
    expect(empty.timeZone).toBe('Europe/Lisbon');
    for (const who of ['biologist', 'pilot', 'guest'] as const) {
      expect((await (await as(who)).put(`/api/campaigns/${ids.campaign}/watches`).send(plan())).status).toBe(403);
    }
    const res = await (await as('lead')).put(`/api/campaigns/${ids.campaign}/watches`).send(plan());
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const set = watchPlanSchema.parse(res.body);
    expect(set.watches.map((w) => [w.name, w.start, w.end, w.members.length])).toEqual([
      ['Morning', '04:00', '08:00', 2],
      ['Forenoon', '08:00', '12:00', 1],
    ]);
    expect(set.mailHandovers).toBe(true);
  });

  it('refuses overlapping watches, bad times and people from outside the campaign with 400s naming the field', async () => {
    const lead = await as('lead');
    const put = (body: object) => lead.put(`/api/campaigns/${ids.campaign}/watches`).send(body);
    const overlap = await put({
      watches: [
        { name: 'Night', start: '22:00', end: '02:00', memberIds: [] },
        { name: 'Early', start: '01:00', end: '05:00', memberIds: [] },
      ],
    });
    expect(overlap.status).toBe(400);
    expect(overlap.body.error.code).toBe('validation_failed');
    expect(overlap.body.error.issues).toEqual([{ path: 'watches.1.start', message: 'Early overlaps Night' }]);
    const badTime = await put({ watches: [{ name: 'A', start: '24:00', end: '04:00', memberIds: [] }] });
    expect(badTime.status).toBe(400);
    expect(badTime.body.error.issues[0].path).toBe('watches.0.start');
    const stranger = await put({ watches: [{ name: 'A', start: '00:00', end: '04:00', memberIds: [ids.userId(emails.outsider)] }] });
    expect(stranger.status).toBe(400);
    expect(stranger.body.error.issues[0].path).toBe('watches.0.memberIds.0');
    const extra = await put({ watches: [], campaignId: ids.otherCampaign });
    expect(extra.status).toBe(400);
    // Nothing refused changed the plan.
    const now = watchPlanSchema.parse((await lead.get(`/api/campaigns/${ids.campaign}/watches`)).body);
    expect(now.watches.map((w) => w.name)).toEqual(['Morning', 'Forenoon']);
  });
});

describe('the handover at a change of watch', () => {
  const change = new Date('2026-11-20T08:00:00.000Z'); // 08:00 in Lisbon
  let handoverId: string;

  it('writes one note with the watch’s entries by kind, the open items and the dive’s phase and depth', async () => {
    // The plan was set during the watch in question (before that, no change of watch is due a note).
    t.ctx.db.$client
      .prepare('update watch_plans set updated_at = ? where campaign_id = ?')
      .run(Date.parse('2026-11-20T05:00:00Z'), ids.campaign);
    const inWatch = (hhmm: string) => `2026-11-20T${hhmm}:00.000Z`;
    await log('biologist', { kind: 'biology', title: 'Before the watch', observedAt: '2026-11-20T03:30:00.000Z' });
    const unverified = await log('biologist', { kind: 'biology', title: 'Squat lobster', observedAt: inWatch('06:10') });
    await (
      await as('biologist')
    )
      .put(`/api/observations/${unverified.id}/identification`)
      .send({ version: unverified.version, scientificName: 'Munida' });
    const verified = await log('archaeologist', { kind: 'biology', title: 'Stony coral', observedAt: inWatch('06:20') });
    const named = await (
      await as('archaeologist')
    )
      .put(`/api/observations/${verified.id}/identification`)
      .send({ version: verified.version, scientificName: 'Desmophyllum pertusum' });
    expect(named.status, JSON.stringify(named.body)).toBe(200);
    const v = await (
      await as('biologist')
    )
      .post(`/api/observations/${verified.id}/identification/verify`)
      .send({ version: named.body.version, status: 'verified' });
    expect(v.status, JSON.stringify(v.body)).toBe(200);
    const amphora = await log('archaeologist', { kind: 'archaeology', title: 'Amphora neck', observedAt: inWatch('06:30') });
    expect(
      (await (await as('archaeologist')).put(`/api/observations/${amphora.id}/find`).send({ version: amphora.version, findNumber: 'W-F1' }))
        .status,
    ).toBe(200);
    const water = await log('biologist', { kind: 'environment', title: 'Niskin bottle', observedAt: inWatch('06:40') });
    expect(
      (await (await as('biologist')).put(`/api/observations/${water.id}/sample`).send({ sampleNumber: 'W-S1', sampleType: 'water' }))
        .status,
    ).toBe(200);
    const kept = await log('biologist', { kind: 'environment', title: 'Push core', observedAt: inWatch('06:50') });
    expect(
      (await (await as('biologist')).put(`/api/observations/${kept.id}/sample`).send({ sampleNumber: 'W-S2', sampleType: 'sediment' }))
        .status,
    ).toBe(200);
    const custody = await (
      await as('biologist')
    )
      .post(`/api/observations/${kept.id}/custody`)
      .send({ holder: 'Biology lab', since: inWatch('07:30'), location: 'Cold room' });
    expect(custody.status, JSON.stringify(custody.body)).toBeLessThan(300);
    const fault = await log('pilot', {
      kind: 'operations',
      title: 'Manipulator jaw sticks',
      observedAt: inWatch('07:00'),
      tags: ['Fault'],
    });
    await log('pilot', { kind: 'operations', title: 'Thruster check', observedAt: inWatch('07:10'), tags: ['routine'] });
    await log('pilot', { kind: 'operations', title: 'After the change', observedAt: '2026-11-20T08:10:00.000Z' });
    t.ctx.db.$client
      .prepare('insert into telemetry_samples (dive_id, t, depth) values (?, ?, ?), (?, ?, ?)')
      .run(diveId, Date.parse('2026-11-20T07:59:00Z'), 512.4, diveId, Date.parse('2026-11-20T08:05:00Z'), 530);

    expect(t.ctx.handovers.tick(new Date('2026-11-20T08:00:30.000Z'))).toBe(1);
    expect(t.ctx.handovers.tick(new Date('2026-11-20T08:01:00.000Z'))).toBe(0);
    expect(t.ctx.handovers.tick(new Date('2026-11-20T08:00:30.000Z'))).toBe(0);

    const list = handoverListSchema.parse((await (await as('guest')).get(`/api/campaigns/${ids.campaign}/handovers`)).body);
    expect(list.items).toHaveLength(1);
    const h = list.items[0]!;
    handoverId = h.id;
    expect(h.changeAt).toBe(change.toISOString());
    expect(h.diveId).toBe(diveId);
    expect(h.outgoing?.name).toBe('Morning');
    expect(h.outgoing?.start).toBe('2026-11-20T04:00:00.000Z');
    expect(h.incoming?.name).toBe('Forenoon');
    expect(h.incoming?.members.map((m) => m.id)).toEqual([ids.userId(emails.pilot)]);
    expect(h.content.entries.total).toBe(7);
    expect(h.content.entries.byKind).toEqual({ biology: 2, archaeology: 1, environment: 2, operations: 2 });
    expect(h.content.dive).toEqual({ id: diveId, number: 'W-01', phase: 'on-bottom', depth: 512.4, depthAt: '2026-11-20T07:59:00.000Z' });
    const open = h.content.openItems.filter((o) =>
      [unverified.id, verified.id, amphora.id, water.id, kept.id, fault.id].includes(o.observationId),
    );
    expect(open.map((o) => [o.kind, o.observationId])).toEqual([
      ['identification-unverified', unverified.id],
      ['find-in-situ', amphora.id],
      ['sample-without-custody', water.id],
      ['operations-fault', fault.id],
    ]);
    expect(h.acknowledgedAt).toBeNull();
  });

  it('is told at once to the readers of the dive’s log, with the note itself', async () => {
    const e = await reader.next((x) => x.event === 'handover.written', 2000);
    const told = handoverSchema.parse(JSON.parse(e.data));
    expect(told.id).toBe(handoverId);
    expect(told.changeAt).toBe(change.toISOString());
    expect(told.content.entries.total).toBe(7);
    // Kept for a reader who reconnects, like every live event.
    expect(
      t.ctx.db.$client.prepare("select count(*) from live_events where type = 'handover.written' and dive_id = ?").pluck().get(diveId),
    ).toBe(1);
  });

  it('is mailed to the incoming watch through the mail queue', async () => {
    const rows = t.ctx.db.$client.prepare('select kind, "to", subject from mail_queue where ref = ?').all(handoverId) as {
      to: string;
      subject: string;
    }[];
    expect(rows).toEqual([{ kind: 'mail', to: emails.pilot, subject: 'Handover: Morning to Forenoon, Test campaign 2026' }]);
    await t.ctx.mail.settled();
    const state = t.ctx.db.$client.prepare('select state from mail_queue where ref = ?').pluck().get(handoverId);
    expect(state).toBe('sent');
  });

  it('is mailed again when a lead asks, and only a lead may', async () => {
    const path = `/api/handovers/${handoverId}/mail`;
    expect((await (await as('pilot')).post(path)).status).toBe(403);
    const res = await (await as('lead')).post(path);
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    expect(res.body).toEqual({ queued: 1 });
    expect(t.ctx.db.$client.prepare('select count(*) from mail_queue where ref = ?').pluck().get(handoverId)).toBe(2);
  });

  it('tells who stood which watch, from the notes where there are some', () => {
    const stood = watchStandersDuring(t.ctx.db, ids.campaign, new Date('2026-11-20T06:00:00Z'), new Date('2026-11-20T09:00:00Z'));
    expect(stood.map((s) => [s.watch, s.start.toISOString(), s.members.map((m) => m.id).sort()])).toEqual([
      ['Morning', '2026-11-20T04:00:00.000Z', [ids.userId(emails.biologist), ids.userId(emails.archaeologist)].sort()],
      ['Forenoon', '2026-11-20T08:00:00.000Z', [ids.userId(emails.pilot)]],
    ]);
  });

  it('is acknowledged by someone of the incoming watch, once', async () => {
    const path = `/api/handovers/${handoverId}/acknowledge`;
    expect((await (await as('biologist')).post(path)).status).toBe(403);
    expect((await (await as('guest')).post(path)).status).toBe(403);
    expect((await (await as('outsider')).post(path)).status).toBe(404);
    const res = await (await as('pilot')).post(path);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const h = handoverSchema.parse(res.body);
    expect(h.acknowledgedBy?.id).toBe(ids.userId(emails.pilot));
    expect(h.acknowledgedAt).not.toBeNull();
    const again = handoverSchema.parse((await (await as('lead')).post(path)).body);
    expect(again.acknowledgedBy?.id).toBe(ids.userId(emails.pilot));
    expect(again.acknowledgedAt).toBe(h.acknowledgedAt);
    // The readers hear of the acknowledgment once: acknowledging again changes nothing.
    const e = await reader.next((x) => x.event === 'handover.acknowledged', 2000);
    expect(handoverSchema.parse(JSON.parse(e.data)).acknowledgedBy?.id).toBe(ids.userId(emails.pilot));
    await (await as('guest')).get(`/api/campaigns/${ids.campaign}/handovers`);
    expect(heard('handover.acknowledged')).toHaveLength(1);
  });

  it('is not written before the plan was set, nor where the plan has no change', () => {
    t.ctx.db.$client
      .prepare('update watch_plans set updated_at = ? where campaign_id = ?')
      .run(Date.parse('2026-11-21T09:00:00Z'), ids.campaign);
    // The 08:00 change of the 21st came before the plan was set; the next change is at 12:00.
    expect(t.ctx.handovers.tick(new Date('2026-11-21T11:59:00.000Z'))).toBe(0);
    expect(t.ctx.handovers.tick(new Date('2026-11-21T12:00:00.000Z'))).toBe(1);
  });
});

describe('after the server was down', () => {
  it('writes a note for every change of watch it missed within the last day, oldest first, each with its own watch’s entries', async () => {
    // The last note was written at 12:00 on the 21st; the server then stops until 09:30 on the 23rd.
    await log('biologist', { kind: 'biology', title: 'Forenoon on the 22nd', observedAt: '2026-11-22T10:00:00.000Z' });
    await log('biologist', { kind: 'biology', title: 'Morning on the 23rd', observedAt: '2026-11-23T05:00:00.000Z' });
    await log('pilot', { kind: 'operations', title: 'Morning on the 23rd, later', observedAt: '2026-11-23T06:00:00.000Z' });
    const before = heard('handover.written').length;
    const back = new Date('2026-11-23T09:30:00.000Z');
    // Within the day before 09:30 on the 23rd: 12:00 on the 22nd, 04:00 and 08:00 on the 23rd.
    // The 04:00 and 08:00 changes of the 22nd lie further back and get no note.
    expect(t.ctx.handovers.tick(back)).toBe(3);
    expect(t.ctx.handovers.tick(back)).toBe(0);
    expect(t.ctx.handovers.tick(new Date('2026-11-23T09:31:00.000Z'))).toBe(0);

    const list = handoverListSchema.parse((await (await as('guest')).get(`/api/campaigns/${ids.campaign}/handovers`)).body);
    expect(list.items.map((h) => [h.changeAt, h.outgoing?.name ?? null, h.incoming?.name ?? null, h.content.entries.total])).toEqual([
      ['2026-11-23T08:00:00.000Z', 'Morning', 'Forenoon', 2],
      ['2026-11-23T04:00:00.000Z', null, 'Morning', 0],
      ['2026-11-22T12:00:00.000Z', 'Forenoon', null, 1],
      ['2026-11-21T12:00:00.000Z', 'Forenoon', null, 0],
      ['2026-11-20T08:00:00.000Z', 'Morning', 'Forenoon', 7],
    ]);
    expect(list.items[0]!.content.entries.byKind).toEqual({ biology: 1, archaeology: 0, environment: 0, operations: 1 });
    // Written oldest first, and told to the readers in that order.
    const order = t.ctx.db.$client
      .prepare('select change_at from handovers where campaign_id = ? and change_at > ? order by rowid')
      .pluck()
      .all(ids.campaign, Date.parse('2026-11-22T00:00:00Z'));
    expect(order).toEqual([Date.parse('2026-11-22T12:00:00Z'), Date.parse('2026-11-23T04:00:00Z'), Date.parse('2026-11-23T08:00:00Z')]);
    await reader.next(() => heard('handover.written').length >= before + 3, 2000);
    expect(
      heard('handover.written')
        .slice(before)
        .map((h) => h.changeAt),
    ).toEqual(['2026-11-22T12:00:00.000Z', '2026-11-23T04:00:00.000Z', '2026-11-23T08:00:00.000Z']);
    // Only the note whose incoming watch is on now is mailed.
    const mailed = t.ctx.db.$client
      .prepare('select h.change_at from mail_queue m join handovers h on h.id = m.ref where h.change_at > ?')
      .pluck()
      .all(Date.parse('2026-11-22T00:00:00Z'));
    expect(mailed).toEqual([Date.parse('2026-11-23T08:00:00Z')]);
  });
});
