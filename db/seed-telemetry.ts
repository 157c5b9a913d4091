/**
 * An invented telemetry log for every demo dive, and the demo entries stamped from it. The
 * vehicle descends from the surface at about 22 m/min, wanders over the wreck within about 80 m
 * of the site datum, and comes up at about 25 m/min; one dive has a two-minute gap in its log so
 * that "no telemetry" shows. Every number here is made up.
 */
import { asc, eq } from 'drizzle-orm';

import { buildTelemetrySeries, sampleAt, type TelemetryRow } from '../lib/interpolate';
import { fromLocalEN } from '../lib/geodesy';
import { pressureFromDepth } from '../lib/seawater';
import type { Db } from './client';
import { random } from './seed-random';
import * as s from './schema';

/** The dive whose log has a gap, and the entry the gap is centred on. */
const GAP_DIVE = 'VS-03';
const GAP_ENTRY = 4;
const GAP_MS = 2 * 60_000;
/** Minutes of log before launch and after on deck (the vehicle on deck, logging already). */
const MARGIN_MIN = 3;

const round = (v: number, places: number) => Math.round(v * 10 ** places) / 10 ** places;
const smooth = (f: number) => f * f * (3 - 2 * f);

/** Water temperature by depth: a warm surface layer over the cold water of the wreck. */
const temperatureAt = (depth: number, drift: number) => 10.72 + 6.6 * Math.exp(-depth / 110) + drift;

type Phases = { launch: number; onBottom: number; offBottom: number; onDeck: number };

/** One sample a second from shortly before launch until shortly after on deck. */
function diveLog(p: Phases, bottom: number, datum: { lat: number; lon: number }, seed: number, gap: [number, number] | null) {
  const rand = random(seed);
  const phase = Array.from({ length: 6 }, () => rand() * Math.PI * 2);
  // The ship keeps station south-west of the datum; the vehicle leaves and returns there.
  const ship = { east: -70 - rand() * 30, north: -60 - rand() * 30 };
  const wander = (t: number) => {
    const m = (t - p.onBottom) / 60_000;
    return {
      east: 48 * Math.sin(m / 23 + phase[0]!) + 22 * Math.sin(m / 7.1 + phase[1]!),
      north: 40 * Math.sin(m / 31 + phase[2]!) + 18 * Math.cos(m / 9.3 + phase[3]!),
    };
  };
  const first = wander(p.onBottom);
  const last = wander(p.offBottom);
  const rows: TelemetryRow[] = [];
  const start = p.launch - MARGIN_MIN * 60_000;
  const end = p.onDeck + MARGIN_MIN * 60_000;
  let heading = rand() * 360;
  let prev = ship;
  for (let t = start; t <= end; t += 1000) {
    if (gap && t > gap[0] && t < gap[1]) continue;
    let depth: number;
    let at: { east: number; north: number };
    if (t < p.launch || t > p.onDeck) {
      depth = 0;
      at = ship;
    } else if (t < p.onBottom) {
      const f = (t - p.launch) / (p.onBottom - p.launch);
      depth = (bottom - 4) * f + 4 * smooth(f);
      at = { east: ship.east + (first.east - ship.east) * smooth(f), north: ship.north + (first.north - ship.north) * smooth(f) };
    } else if (t <= p.offBottom) {
      const m = (t - p.onBottom) / 60_000;
      at = wander(t);
      // The wreck mound rises a few metres above the seabed the vehicle follows.
      depth = bottom + 4 * Math.sin(m / 17 + phase[4]!) - 3 * Math.max(0, Math.cos(m / 5 + phase[5]!)) + (rand() - 0.5) * 0.3;
    } else {
      const f = (t - p.offBottom) / (p.onDeck - p.offBottom);
      depth = bottom * (1 - f);
      at = { east: last.east + (ship.east - last.east) * smooth(f), north: last.north + (ship.north - last.north) * smooth(f) };
    }
    depth = Math.max(0, depth);
    const moved = Math.hypot(at.east - prev.east, at.north - prev.north);
    if (moved > 0.05) heading = (Math.atan2(at.east - prev.east, at.north - prev.north) * 180) / Math.PI;
    prev = at;
    const position = fromLocalEN(datum, { eastM: at.east + (rand() - 0.5) * 0.4, northM: at.north + (rand() - 0.5) * 0.4 });
    const inWater = t >= p.launch && t <= p.onDeck;
    rows.push({
      t,
      depth: round(depth, 2),
      pressure: round(pressureFromDepth(depth, datum.lat), 2),
      lat: round(position.lat, 7),
      lon: round(position.lon, 7),
      heading: round((heading + 360) % 360, 1),
      altitude: t > p.onBottom && t < p.offBottom ? round(2.2 + 1.4 * Math.sin(t / 90_000) + rand() * 0.3, 2) : null,
      temperature: inWater ? round(temperatureAt(depth, 0.12 * Math.sin(t / 1_800_000 + phase[0]!) + (rand() - 0.5) * 0.02), 3) : null,
      salinity: inWater ? round(35.62 + 0.42 * Math.exp(-depth / 200) + (rand() - 0.5) * 0.01, 3) : null,
    });
  }
  return rows;
}

/**
 * Writes a log for every demo dive that has its four phases, and stamps the entries whose depth,
 * position and temperature were not typed in. Runs once, right after the demo is seeded.
 */
export function seedTelemetry(db: Db): void {
  const pilot = db.select({ id: s.user.id }).from(s.user).where(eq(s.user.email, 'pilot@bathynote.test')).get();
  if (!pilot) return;
  const rows = db
    .select({ dive: s.dives, datumLat: s.campaigns.datumLat, datumLon: s.campaigns.datumLon })
    .from(s.dives)
    .innerJoin(s.campaigns, eq(s.campaigns.id, s.dives.campaignId))
    .orderBy(asc(s.dives.number))
    .all();
  const columns = ['t', 'depth', 'pressure', 'lat', 'lon', 'heading', 'altitude', 'temperature', 'salinity'] as const;
  const width = columns.length + 1;
  const tuple = `(${Array(width).fill('?').join(', ')})`;
  const insertSql = (n: number) =>
    `insert into telemetry_samples (dive_id, ${columns.join(', ')}) values ${Array(n).fill(tuple).join(', ')}`;
  const BATCH = 500;
  const insertBatch = db.$client.prepare(insertSql(BATCH));
  const values: unknown[] = new Array(BATCH * width);
  const insertRows = (diveId: string, log: TelemetryRow[]) => {
    for (let start = 0; start < log.length; start += BATCH) {
      const n = Math.min(BATCH, log.length - start);
      const batch = n === BATCH ? values : new Array(n * width);
      let o = 0;
      for (let i = start; i < start + n; i++) {
        const r = log[i]!;
        batch[o++] = diveId;
        for (const c of columns) batch[o++] = r[c] ?? null;
      }
      (n === BATCH ? insertBatch : db.$client.prepare(insertSql(n))).run(batch);
    }
  };
  const update = db.$client.prepare(
    `update observations set depth = ?, depth_source = ?, lat = ?, lon = ?, position_source = ?, temperature = ?,
       temperature_source = ? where id = ?`,
  );

  db.transaction(() => {
    rows.forEach(({ dive, datumLat, datumLon }, index) => {
      const { launchAt, onBottomAt, offBottomAt, onDeckAt } = dive;
      if (!launchAt || !onBottomAt || !offBottomAt || !onDeckAt) return;
      const phases = {
        launch: launchAt.getTime(),
        onBottom: onBottomAt.getTime(),
        offBottom: offBottomAt.getTime(),
        onDeck: onDeckAt.getTime(),
      };
      const entries = db
        .select()
        .from(s.observations)
        .where(eq(s.observations.diveId, dive.id))
        .orderBy(asc(s.observations.observedAt))
        .all();
      const centre = dive.number === GAP_DIVE ? entries[GAP_ENTRY]?.observedAt.getTime() : undefined;
      const gap: [number, number] | null = centre !== undefined ? [centre - GAP_MS / 2, centre + GAP_MS / 2] : null;
      // The demo dives descend at 22 m/min, so the descent's length gives the seabed depth.
      const bottom = Math.round(((phases.onBottom - phases.launch) / 60_000) * 22);
      const log = diveLog(phases, bottom, { lat: datumLat, lon: datumLon }, 7001 + index, gap);
      insertRows(dive.id, log);
      db.insert(s.telemetryImports)
        .values({
          diveId: dive.id,
          fileName: `skerry-${dive.number.toLowerCase()}-nav.csv`,
          mode: 'replace',
          rowsTaken: log.length,
          rowsRejected: 0,
          firstAt: new Date(log[0]!.t),
          lastAt: new Date(log[log.length - 1]!.t),
          report: { demo: true },
          importedBy: pilot.id,
          importedAt: new Date(phases.onDeck + 30 * 60_000),
        })
        .run();

      const series = buildTelemetrySeries(log);
      const maxGapMs = dive.telemetryGapS * 1000;
      for (const o of entries) {
        if (o.depthSource === 'manual' && o.positionSource === 'manual' && o.temperatureSource === 'manual') continue;
        const fix = sampleAt(series, o.observedAt.getTime(), { maxGapMs });
        const position = fix.lat !== null && fix.lon !== null;
        update.run(
          o.depthSource === 'manual' ? o.depth : fix.depth,
          o.depthSource === 'manual' ? 'manual' : fix.depth !== null ? 'telemetry' : null,
          o.positionSource === 'manual' ? o.lat : position ? fix.lat : null,
          o.positionSource === 'manual' ? o.lon : position ? fix.lon : null,
          o.positionSource === 'manual' ? 'manual' : position ? 'telemetry' : null,
          o.temperatureSource === 'manual' ? o.temperature : fix.temperature,
          o.temperatureSource === 'manual' ? 'manual' : fix.temperature !== null ? 'telemetry' : null,
          o.id,
        );
      }
    });
  });
}
