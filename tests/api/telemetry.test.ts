import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { dives, finds, observations } from '@/db/schema';
import { toLocalEN } from '@/lib/geodesy';
import { diveSummarySchema, observationSchema, telemetryAtSchema, telemetrySamplesSchema, type Observation } from '@/lib/schemas';
import type { LiveEvent } from '@/server/services/live';
import { restampDive } from '@/server/services/telemetry-stamp';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { csv, iso, linearLog, linearSample } from '../fixtures/telemetry/logs';

let t: TestServer;
let ids: Fixtures;
/** Five minutes after the fixture dive reached the bottom, to the second. */
let T0: number;

const STEP_S = 10;
const COUNT = 121;
/** Samples 49 to 59 are missing: from T0 + 480 s to T0 + 600 s the log has nothing (more than the 30 s gap). */
const inGap = (k: number) => k > 48 && k < 60;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t, { telemetry: true });
  const dive = t.ctx.db.select().from(dives).where(eq(dives.id, ids.dive)).get()!;
  T0 = Math.floor(dive.onBottomAt!.getTime() / 1000) * 1000 + 5 * 60_000;
});
afterAll(() => t.close());

async function importAs(email: string, file: Buffer, fields: Record<string, string> = {}) {
  const req = (await t.signIn(email)).post(`/api/dives/${ids.dive}/telemetry`);
  for (const [k, v] of Object.entries(fields)) void req.field(k, v);
  return req.attach('file', file, 'skerry-nav.csv');
}

async function log(body: Record<string, unknown>): Promise<Observation> {
  const res = await (await t.signIn(emails.biologist)).post(`/api/dives/${ids.dive}/observations`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return observationSchema.parse(res.body);
}

const row = (id: string) => t.ctx.db.select().from(observations).where(eq(observations.id, id)).get()!;

describe('stamping entries from the log', () => {
  let a: Observation;
  let inTheGap: Observation;
  let typedDepth: Observation;
  let allTyped: Observation;
  const events: LiveEvent[] = [];
  let reportedUpdated = 0;

  beforeAll(async () => {
    // Logged while the fixture log covers the dive, so they start with its values.
    a = await log({ kind: 'biology', title: 'Sponge', observedAt: iso(T0 + 125_000) });
    inTheGap = await log({ kind: 'archaeology', title: 'Amphora neck', observedAt: iso(T0 + 540_000) });
    typedDepth = await log({ kind: 'biology', title: 'Coral', observedAt: iso(T0 + 305_000), depth: 600 });
    allTyped = await log({
      kind: 'environment',
      title: 'Current',
      observedAt: iso(T0 + 125_000),
      depth: 601.5,
      lat: 36.1451,
      lon: -7.4319,
      temperature: 10.7,
    });
    expect(a.depthSource).toBe('telemetry');
    expect(inTheGap.depthSource).toBe('telemetry');
    const stop = t.ctx.live.subscribeAll((e) => events.push(e));
    const res = await importAs(emails.pilot, linearLog(T0, STEP_S, COUNT, inGap));
    stop();
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.rowsTaken).toBe(COUNT - 11);
    reportedUpdated = res.body.stamped.updated as number;
  });

  it('gives entries without typed values the log’s depth, position and temperature, marked as telemetry', () => {
    const r = row(a.id);
    // Sample 12.5 of the linear log: halfway between samples 12 and 13.
    const k = 12.5;
    const expected = linearSample(T0, STEP_S, k);
    expect(r.depth).toBeCloseTo(expected.depth, 9);
    expect(r.lat).toBeCloseTo(expected.lat, 9);
    expect(r.lon).toBeCloseTo(expected.lon, 9);
    expect(r.temperature).toBeCloseTo(expected.temperature, 9);
    expect([r.depthSource, r.positionSource, r.temperatureSource]).toEqual(['telemetry', 'telemetry', 'telemetry']);
  });

  it('says "no telemetry" (null, no source) for an entry in a gap of the log, rather than a guess', () => {
    const r = row(inTheGap.id);
    expect([r.depth, r.lat, r.lon, r.temperature]).toEqual([null, null, null, null]);
    expect([r.depthSource, r.positionSource, r.temperatureSource]).toEqual([null, null, null]);
  });

  it('leaves typed values alone and still stamps what was not typed', () => {
    const r = row(typedDepth.id);
    expect([r.depth, r.depthSource]).toEqual([600, 'manual']);
    expect(r.temperature).toBeCloseTo(linearSample(T0, STEP_S, 30.5).temperature, 9);
    expect(r.temperatureSource).toBe('telemetry');
    const typed = row(allTyped.id);
    expect([typed.depth, typed.lat, typed.lon, typed.temperature]).toEqual([601.5, 36.1451, -7.4319, 10.7]);
    expect([typed.depthSource, typed.positionSource, typed.temperatureSource]).toEqual(['manual', 'manual', 'manual']);
  });

  it('does not count stamping as an edit, and announces the stamping live as one event', () => {
    for (const o of [a, inTheGap, typedDepth, allTyped]) {
      expect(row(o.id).version).toBe(1);
      expect(row(o.id).updatedAt.getTime()).toBe(Date.parse(o.updatedAt));
    }
    // One event for the whole import, however many entries it stamped again.
    expect(events.filter((e) => e.type === 'observation.updated')).toEqual([]);
    expect(reportedUpdated).toBeGreaterThanOrEqual(3);
    const restamped = events.filter((e) => e.type === 'dive.restamped');
    expect(restamped.map((e) => e.payload)).toEqual([{ diveId: ids.dive, updated: reportedUpdated }]);
    // The entry with every value typed was left alone; the others took the log's values.
    expect(row(allTyped.id).updatedAt.getTime()).toBe(Date.parse(allTyped.updatedAt));
    expect([row(a.id).depthSource, row(inTheGap.id).depthSource, row(typedDepth.id).temperatureSource]).toEqual([
      'telemetry',
      null,
      'telemetry',
    ]);
    expect(events.every((e) => e.diveId === ids.dive && e.campaignId === ids.campaign)).toBe(true);
  });

  it('stamps a new entry from the log, and leaves one in a gap without values', async () => {
    const inside = await log({ kind: 'biology', title: 'Brittle stars', observedAt: iso(T0 + 200_000) });
    expect(inside).toMatchObject({ depthSource: 'telemetry', positionSource: 'telemetry', temperatureSource: 'telemetry' });
    expect(inside.depth).toBeCloseTo(592, 9);
    const gap = await log({ kind: 'biology', title: 'Grenadier', observedAt: iso(T0 + 500_000) });
    expect(gap).toMatchObject({ depth: null, depthSource: null, lat: null, positionSource: null, temperature: null });
  });

  it('re-stamps a dive on demand, after an entry’s time changed', () => {
    t.ctx.db
      .update(observations)
      .set({ observedAt: new Date(T0 + 530_000) })
      .where(eq(observations.id, a.id))
      .run();
    const seen: LiveEvent[] = [];
    const stop = t.ctx.live.subscribeAll((e) => seen.push(e));
    const result = restampDive(t.ctx.db, t.ctx.live, ids.dive);
    stop();
    expect(result.updated).toBe(1);
    expect(row(a.id)).toMatchObject({ depth: null, depthSource: null, version: 1 });
    expect(seen.map((e) => [e.type, e.payload])).toEqual([['dive.restamped', { diveId: ids.dive, updated: 1 }]]);
    t.ctx.db
      .update(observations)
      .set({ observedAt: new Date(T0 + 125_000) })
      .where(eq(observations.id, a.id))
      .run();
    restampDive(t.ctx.db, t.ctx.live, ids.dive);
    expect(row(a.id).depthSource).toBe('telemetry');
  });
});

describe('values at an instant', () => {
  const at = async (t0: number | string) =>
    (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/at`).query({ t: typeof t0 === 'number' ? iso(t0) : t0 });

  it('interpolates inside the log', async () => {
    const res = await at(T0 + 125_000);
    expect(res.status).toBe(200);
    const v = telemetryAtSchema.parse(res.body);
    const expected = linearSample(T0, STEP_S, 12.5);
    expect(v.t).toBe(iso(T0 + 125_000));
    expect(v.noTelemetry).toBeNull();
    expect(v.depth).toBeCloseTo(expected.depth, 9);
    expect(v.lat).toBeCloseTo(expected.lat, 9);
    expect(v.lon).toBeCloseTo(expected.lon, 9);
    expect(v.temperature).toBeCloseTo(expected.temperature, 9);
  });

  it('answers a sample time exactly, and reads a time given with an offset', async () => {
    const v = telemetryAtSchema.parse((await at(new Date(T0 + 20_000).toISOString().replace('Z', '+00:00'))).body);
    expect(v.depth).toBe(590.2);
  });

  it('says why there is no telemetry: in a gap, before the first sample, after the last', async () => {
    expect((await at(T0 + 540_000)).body).toEqual({
      t: iso(T0 + 540_000),
      depth: null,
      lat: null,
      lon: null,
      temperature: null,
      noTelemetry: 'gap',
    });
    expect((await at(T0 - 1)).body).toMatchObject({ depth: null, noTelemetry: 'before-first-sample' });
    expect((await at(T0 + COUNT * STEP_S * 1000)).body).toMatchObject({ depth: null, noTelemetry: 'after-last-sample' });
  });

  it('refuses a time without a zone or no time at all', async () => {
    const noZone = await at('2026-05-13T18:00:00');
    expect(noZone.status).toBe(400);
    expect(noZone.body.error.issues[0].path).toBe('t');
    expect((await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/at`)).status).toBe(400);
  });
});

describe('the summary and the chart samples', () => {
  it('gives the statistics, with the deepest depth of the log', async () => {
    const res = await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/summary`);
    expect(res.status).toBe(200);
    const s = diveSummarySchema.parse(res.body);
    // The linear log's deepest sample is the last: 590 + 0.1 × 120 m.
    expect(s.maxDepth).toBeCloseTo(602, 9);
    expect(typeof res.body.maxDepth).toBe('number');
    expect(s.maxDepthSource).toBe('telemetry');
    expect(s.stats.maxDepthM).toBe(s.maxDepth);
    expect(s.stats.bottomTimeMs).toBeGreaterThan(0);
    expect(s.stats.totalMs).toBeGreaterThan(s.stats.bottomTimeMs!);
    expect(s.stats.trackLengthM).toBeGreaterThan(0);
    expect(s.stats.entryCount).toBe(s.observations.length);
    expect(s.stats.entriesByKind.reduce((n, k) => n + k.count, 0)).toBe(s.observations.length);
    expect(s.span).toEqual({ firstAt: iso(T0), lastAt: iso(T0 + (COUNT - 1) * STEP_S * 1000) });
  });

  it('places entries on the site plan in metres from the datum, with their find numbers', async () => {
    const entry = await log({ kind: 'archaeology', title: 'Amphora toe', observedAt: iso(T0 + 125_000) });
    t.ctx.db.insert(finds).values({ observationId: entry.id, campaignId: ids.campaign, findNumber: 'VS26-F-014' }).run();
    const s = diveSummarySchema.parse((await (await t.signIn(emails.lead)).get(`/api/dives/${ids.dive}/summary`)).body);
    const placed = s.observations.find((o) => o.id === entry.id)!;
    const expected = toLocalEN(s.datum, { lat: row(entry.id).lat!, lon: row(entry.id).lon! });
    expect(placed.east).toBeCloseTo(expected.eastM, 9);
    expect(placed.north).toBeCloseTo(expected.northM, 9);
    // About 1.4 m north and 1.1 m west of the datum: 1.25 × 10⁻⁵ degrees of latitude and longitude.
    expect(placed.north).toBeGreaterThan(1.3);
    expect(placed.east).toBeLessThan(-1);
    expect(placed.findNumber).toBe('VS26-F-014');
    expect(s.finds).toContainEqual({ observationId: entry.id, findNumber: 'VS26-F-014', east: placed.east, north: placed.north });
    const gap = s.observations.find((o) => o.title === 'Amphora neck')!;
    expect([gap.east, gap.north, gap.depth]).toEqual([null, null, null]);
  });

  it('thins the log to at most N points for charts, keeping the first and the last', async () => {
    const res = await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/telemetry`).query({ points: 20 });
    expect(res.status).toBe(200);
    const body = telemetrySamplesSchema.parse(res.body);
    expect(body.sampleCount).toBe(COUNT - 11);
    expect(body.points.length).toBeLessThanOrEqual(20);
    expect(body.points.length).toBeGreaterThan(10);
    expect(body.points[0]!.t).toBe(iso(T0));
    expect(body.points.at(-1)!.t).toBe(iso(T0 + (COUNT - 1) * STEP_S * 1000));
    expect(body.points.at(-1)!.depth).toBeCloseTo(602, 9);
    expect(body.track.length).toBeLessThanOrEqual(20);
    expect(body.track[0]!.t).toBe(iso(T0));
    expect(body.track.at(-1)!.t).toBe(iso(T0 + (COUNT - 1) * STEP_S * 1000));
    expect(body.gaps).toEqual([{ from: iso(T0 + 480_000), to: iso(T0 + 600_000) }]);
    expect(body.gapS).toBe(30);
    expect(body.channels).toMatchObject({ depth: COUNT - 11, position: COUNT - 11, temperature: COUNT - 11, pressure: 0 });
  });

  it('thins a long log the same way', async () => {
    const rows = Array.from({ length: 6000 }, (_, k) => [iso(T0 + k * 1000), (500 + 50 * Math.sin(k / 300)).toFixed(2)]);
    expect((await importAs(emails.lead, csv(['time', 'depth_m'], rows))).status).toBe(201);
    const body = telemetrySamplesSchema.parse(
      (await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/telemetry`).query({ points: 100 })).body,
    );
    expect(body.points).toHaveLength(100);
    expect(body.points[0]!.t).toBe(iso(T0));
    expect(body.points.at(-1)!.t).toBe(iso(T0 + 5999_000));
    const all = telemetrySamplesSchema.parse((await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/telemetry`)).body);
    expect(all.points).toHaveLength(1000);
    await importAs(emails.pilot, linearLog(T0, STEP_S, COUNT, inGap));
  });

  it('refuses a number of points out of range', async () => {
    const guest = await t.signIn(emails.guest);
    for (const points of ['2', '5001', 'many']) {
      const res = await guest.get(`/api/dives/${ids.dive}/telemetry`).query({ points });
      expect(res.status, points).toBe(400);
      expect(res.body.error.issues[0].path).toBe('points');
    }
    expect((await guest.get(`/api/dives/${ids.dive}/telemetry`).query({ limit: 5 })).status).toBe(400);
  });

  it('answers a dive without a log with empty samples and "no telemetry"', async () => {
    const guest = await t.signIn(emails.lead);
    const created = await guest.post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'VS-09', objectives: 'Spare' });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const diveId = created.body.id as string;
    const samples = telemetrySamplesSchema.parse((await guest.get(`/api/dives/${diveId}/telemetry`)).body);
    expect(samples).toMatchObject({ sampleCount: 0, span: null, points: [], track: [], gaps: [], imports: [] });
    expect((await guest.get(`/api/dives/${diveId}/at`).query({ t: iso(T0) })).body.noTelemetry).toBe('empty-series');
    const summary = diveSummarySchema.parse((await guest.get(`/api/dives/${diveId}/summary`)).body);
    expect(summary).toMatchObject({ maxDepth: null, maxDepthSource: null, span: null, observations: [] });
  });
});

describe('who may do what', () => {
  const file = () => linearLog(T0, STEP_S, COUNT, inGap);
  const paths = () => [
    `/api/dives/${ids.dive}/telemetry`,
    `/api/dives/${ids.dive}/at?t=${encodeURIComponent(iso(T0))}`,
    `/api/dives/${ids.dive}/summary`,
  ];

  it('lets only the lead and the pilot import', async () => {
    for (const email of [emails.guest, emails.biologist, emails.archaeologist]) {
      const res = await importAs(email, file());
      expect(res.status, email).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    expect((await importAs(emails.lead, file())).status).toBe(201);
    expect((await importAs(emails.pilot, file())).status).toBe(201);
  });

  it('shows nothing of the dive to someone outside its campaign', async () => {
    const outsider = await t.signIn(emails.outsider);
    for (const p of paths()) expect((await outsider.get(p)).status, p).toBe(404);
    const res = await importAs(emails.outsider, file());
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.body)).not.toContain('Varn');
    // The 2024 campaign's dive is out of reach of the guest of 2026 alone.
    expect((await (await t.signIn(emails.guest)).get(`/api/dives/${ids.otherDive}/summary`)).status).toBe(404);
  });

  it('asks anonymous callers to sign in', async () => {
    for (const p of paths()) expect((await t.anonymous().get(p)).status, p).toBe(401);
    const res = await t.anonymous().post(`/api/dives/${ids.dive}/telemetry`).attach('file', file(), 'x.csv');
    expect(res.status).toBe(401);
  });

  it('lets every member read', async () => {
    for (const email of [emails.guest, emails.biologist, emails.pilot, emails.lead, emails.admin]) {
      const member = await t.signIn(email);
      for (const p of paths()) expect((await member.get(p)).status, `${email} ${p}`).toBe(200);
    }
  });
});
