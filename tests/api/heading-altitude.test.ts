import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { dives } from '@/db/schema';
import { observationDetailSchema, observationSchema, type Observation } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { csv, iso } from '../fixtures/telemetry/logs';

let t: TestServer;
let ids: Fixtures;
/** Five minutes after the fixture dive reached the bottom, to the second. */
let T0: number;

/**
 * Sample k, every 10 s from T0: heading (355 + 3k) mod 360, so the vehicle turns through north
 * between samples 1 (358°) and 2 (1°); altitude 2.5 + 0.2·k m. Samples 11 to 15 are missing, a
 * 60 s hole between 100 s and 160 s, wider than the dive's 30 s gap.
 */
function turningLog(): Buffer {
  const rows: (string | number)[][] = [];
  for (let k = 0; k <= 20; k++) {
    if (k > 10 && k < 16) continue;
    rows.push([iso(T0 + k * 10_000), (600 + 0.1 * k).toFixed(2), ((355 + 3 * k) % 360).toFixed(1), (2.5 + 0.2 * k).toFixed(2)]);
  }
  return csv(['time', 'depth_m', 'heading', 'altitude_m'], rows);
}

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t);
  const dive = t.ctx.db.select().from(dives).where(eq(dives.id, ids.dive)).get()!;
  T0 = Math.floor(dive.onBottomAt!.getTime() / 1000) * 1000 + 5 * 60_000;
});
afterAll(() => t.close());

async function log(body: Record<string, unknown>): Promise<Observation> {
  const res = await (await t.signIn(emails.biologist)).post(`/api/dives/${ids.dive}/observations`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return observationSchema.parse(res.body);
}

async function detail(id: string) {
  const res = await (await t.signIn(emails.biologist)).get(`/api/observations/${id}`);
  expect(res.status).toBe(200);
  return observationDetailSchema.parse(res.body);
}

describe('heading and altitude on entries', () => {
  let loggedBefore: Observation;

  beforeAll(async () => {
    // Logged before the log arrives: the import stamps it.
    loggedBefore = await log({ kind: 'biology', title: 'Sponge', observedAt: iso(T0 + 17_500) });
    expect(loggedBefore.heading).toBeNull();
    expect(loggedBefore.headingSource).toBeNull();
    const res = await (await t.signIn(emails.pilot)).post(`/api/dives/${ids.dive}/telemetry`).attach('file', turningLog(), 'turning.csv');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
  });

  it('stamps an entry logged earlier when the log is imported, turning through north', async () => {
    const o = await detail(loggedBefore.id);
    // Worked here: at sample 1.75, 358° + 0.75 · 3° = 360.25° → 0.25°; straight-line arithmetic
    // on the numbers would give 358 + 0.75 · (1 − 358) = 90.25°.
    expect(o.heading).toBeCloseTo(0.25, 9);
    expect(o.headingSource).toBe('telemetry');
    // Worked here: 2.5 + 0.2 · 1.75 = 2.85 m.
    expect(o.altitude).toBeCloseTo(2.85, 9);
    expect(o.altitudeSource).toBe('telemetry');
  });

  it('stamps a new entry from the log, just before north', async () => {
    const o = await log({ kind: 'environment', title: 'Mat edge', observedAt: iso(T0 + 15_000) });
    // Worked here: at sample 1.5, 358° + 0.5 · 3° = 359.5°; altitude 2.5 + 0.2 · 1.5 = 2.8 m.
    expect(o.heading).toBeCloseTo(359.5, 9);
    expect(o.headingSource).toBe('telemetry');
    expect(o.altitude).toBeCloseTo(2.8, 9);
    expect(o.altitudeSource).toBe('telemetry');
  });

  it('keeps a typed heading as manual, takes the altitude from the log, and falls back when it is cleared', async () => {
    const o = await log({ kind: 'biology', title: 'Coral', observedAt: iso(T0 + 15_000), heading: 123 });
    expect(o.heading).toBe(123);
    expect(o.headingSource).toBe('manual');
    expect(o.altitudeSource).toBe('telemetry');

    // A later import does not overwrite what was typed.
    const again = await (await t.signIn(emails.pilot)).post(`/api/dives/${ids.dive}/telemetry`).attach('file', turningLog(), 'turning.csv');
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    expect((await detail(o.id)).heading).toBe(123);

    const bio = await t.signIn(emails.biologist);
    const edited = await bio.patch(`/api/observations/${o.id}`).send({ version: o.version, altitude: 4 });
    expect(edited.status, JSON.stringify(edited.body)).toBe(200);
    expect(edited.body.altitude).toBe(4);
    expect(edited.body.altitudeSource).toBe('manual');
    expect(edited.body.heading).toBe(123);

    const cleared = await bio.patch(`/api/observations/${o.id}`).send({ version: edited.body.version, heading: null });
    expect(cleared.status, JSON.stringify(cleared.body)).toBe(200);
    expect(cleared.body.heading).toBeCloseTo(359.5, 9);
    expect(cleared.body.headingSource).toBe('telemetry');
    expect(cleared.body.altitude).toBe(4);
  });

  it('gives null with no source inside a gap in the log', async () => {
    const o = await log({ kind: 'archaeology', title: 'Sherd', observedAt: iso(T0 + 130_000) });
    expect(o.heading).toBeNull();
    expect(o.headingSource).toBeNull();
    expect(o.altitude).toBeNull();
    expect(o.altitudeSource).toBeNull();
  });

  it('refuses a heading outside the compass and a negative altitude', async () => {
    const bio = await t.signIn(emails.biologist);
    for (const bad of [{ heading: 360 }, { heading: -1 }, { altitude: -0.5 }]) {
      const res = await bio.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title: 'Bad', ...bad });
      expect(res.status, JSON.stringify(bad)).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
    }
  });
});
