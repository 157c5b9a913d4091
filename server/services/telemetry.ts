import { and, asc, desc, eq } from 'drizzle-orm';
import type { z } from 'zod';

import type { Db } from '../../db/client';
import { campaigns, dives, observations, telemetryImports, user } from '../../db/schema';
import { diveStats } from '../../lib/dive-stats';
import { isOutsideDive } from '../../lib/dive-window';
import { lttbIndices } from '../../lib/downsample';
import { toLocalEN, type LatLon } from '../../lib/geodesy';
import { buildTelemetrySeries, sampleAt, type TelemetryRow, type TelemetrySeries } from '../../lib/interpolate';
import {
  type telemetryAtQuerySchema,
  type telemetryQuerySchema,
  type DiveSummary,
  type NoTelemetryReason,
  type TelemetryAt,
  type TelemetryImportSummary,
  type TelemetrySamples,
  type TelemetrySpan,
} from '../../lib/schemas';
import { notFound } from '../errors';
import { findNumbersOf, tagsOf } from './observations/hydrate';
import { cachedLog, logOf, STORED_CHANNELS } from './telemetry-series';

export type TelemetryValues = {
  depth: number | null;
  lat: number | null;
  lon: number | null;
  temperature: number | null;
  heading: number | null;
  altitude: number | null;
};

const iso = (ms: number) => new Date(ms).toISOString();

export function spanOf(firstMs: number | null, lastMs: number | null): TelemetrySpan | null {
  return firstMs === null || lastMs === null ? null : { firstAt: iso(firstMs), lastAt: iso(lastMs) };
}

type DiveFacts = {
  campaignId: string;
  plannedStartAt: number | null;
  gapMs: number;
  datum: LatLon;
  phases: Record<'launch' | 'onBottom' | 'offBottom' | 'onDeck', number | null>;
};

/** What the telemetry views need to know about a dive and its campaign. */
export function diveFacts(db: Db, diveId: string): DiveFacts {
  const row = db
    .select({ dive: dives, datumLat: campaigns.datumLat, datumLon: campaigns.datumLon })
    .from(dives)
    .innerJoin(campaigns, eq(campaigns.id, dives.campaignId))
    .where(eq(dives.id, diveId))
    .get();
  if (!row) throw notFound();
  const ms = (d: Date | null) => (d ? d.getTime() : null);
  return {
    campaignId: row.dive.campaignId,
    plannedStartAt: ms(row.dive.plannedStartAt),
    gapMs: row.dive.telemetryGapS * 1000,
    datum: { lat: row.datumLat, lon: row.datumLon },
    phases: {
      launch: ms(row.dive.launchAt),
      onBottom: ms(row.dive.onBottomAt),
      offBottom: ms(row.dive.offBottomAt),
      onDeck: ms(row.dive.onDeckAt),
    },
  };
}

type WindowQueries = {
  rows: (diveId: string, from: number, to: number) => TelemetryRow[];
  gap: (diveId: string) => number | undefined;
  bounds: (diveId: string) => { first: number | null; last: number | null };
};

const windowStatements = new WeakMap<Db, WindowQueries>();

function windowQueries(db: Db) {
  let q = windowStatements.get(db);
  if (!q) {
    const rows = db.$client.prepare(
      `select t, ${STORED_CHANNELS.join(', ')} from telemetry_samples where dive_id = ? and t between ? and ? order by t`,
    );
    const gap = db.$client.prepare('select telemetry_gap_s from dives where id = ?').pluck();
    const bounds = db.$client.prepare('select min(t) as first, max(t) as last from telemetry_samples where dive_id = ?');
    q = {
      rows: (diveId, from, to) => rows.all(diveId, from, to) as TelemetryRow[],
      gap: (diveId) => gap.get(diveId) as number | undefined,
      bounds: (diveId) => bounds.get(diveId) as { first: number | null; last: number | null },
    };
    windowStatements.set(db, q);
  }
  return q;
}

/**
 * The series around one instant: every pair of samples close enough to be interpolated across
 * lies within one gap length of it, so reading that window answers exactly as the whole log would.
 */
function seriesAround(db: Db, diveId: string, atMs: number, gapMs: number): TelemetrySeries {
  const cached = cachedLog(db, diveId);
  if (cached) return cached.series;
  return buildTelemetrySeries(windowQueries(db).rows(diveId, atMs - gapMs, atMs + gapMs));
}

/**
 * Depth, position and temperature interpolated from the dive's telemetry log at an instant, or
 * null when the dive has no telemetry there (no log, or the nearest samples are too far apart).
 */
export function telemetryValuesAt(db: Db, diveId: string, atMs: number): TelemetryValues | null {
  const gapS = windowQueries(db).gap(diveId);
  if (gapS === undefined || !Number.isFinite(atMs)) return null;
  const gapMs = gapS * 1000;
  const fix = sampleAt(seriesAround(db, diveId, atMs, gapMs), atMs, { maxGapMs: gapMs });
  if (fix.depth === null && fix.lat === null && fix.temperature === null && fix.heading === null && fix.altitude === null) return null;
  return { depth: fix.depth, lat: fix.lat, lon: fix.lon, temperature: fix.temperature, heading: fix.heading, altitude: fix.altitude };
}

/** `GET /api/dives/:diveId/at`: the log's values at an instant, or why there are none. */
export function telemetryAt(db: Db, diveId: string, { t }: z.output<typeof telemetryAtQuerySchema>): TelemetryAt {
  const atMs = new Date(t).getTime();
  const values = telemetryValuesAt(db, diveId, atMs);
  let noTelemetry: NoTelemetryReason | null = null;
  if (!values) {
    const { first, last } = windowQueries(db).bounds(diveId);
    if (first === null || last === null) noTelemetry = 'empty-series';
    else if (atMs < first) noTelemetry = 'before-first-sample';
    else if (atMs > last) noTelemetry = 'after-last-sample';
    else noTelemetry = 'gap';
  }
  return {
    t: iso(atMs),
    depth: values?.depth ?? null,
    lat: values?.lat ?? null,
    lon: values?.lon ?? null,
    temperature: values?.temperature ?? null,
    noTelemetry,
  };
}

/** Stretches of more than `gapMs` without any sample, earliest first. */
function gapsIn(times: Float64Array, gapMs: number, limit: number): { from: string; to: string }[] {
  const out: { from: string; to: string }[] = [];
  for (let i = 1; i < times.length && out.length < limit; i++) {
    const a = times[i - 1] as number;
    const b = times[i] as number;
    if (b - a > gapMs) out.push({ from: iso(a), to: iso(b) });
  }
  return out;
}

/** Indices 0..n−1 spread evenly, at most `k` of them, first and last included. */
function evenIndices(n: number, k: number): number[] {
  if (n <= k) return Array.from({ length: n }, (_, i) => i);
  return Array.from({ length: k }, (_, i) => Math.round((i * (n - 1)) / (k - 1)));
}

export function importHistory(db: Db, diveId: string): TelemetryImportSummary[] {
  return db
    .select({ imp: telemetryImports, name: user.name })
    .from(telemetryImports)
    .innerJoin(user, eq(user.id, telemetryImports.importedBy))
    .where(eq(telemetryImports.diveId, diveId))
    .orderBy(desc(telemetryImports.importedAt))
    .limit(50)
    .all()
    .map(({ imp, name }) => {
      // Reports kept before warnings carried a code hold plain strings.
      const report = imp.report as {
        rejected?: TelemetryImportSummary['rejected'];
        warnings?: (string | { code: string; message: string })[];
      };
      return {
        id: imp.id,
        fileName: imp.fileName,
        mode: imp.mode,
        rowsTaken: imp.rowsTaken,
        rowsRejected: imp.rowsRejected,
        span: spanOf(imp.firstAt?.getTime() ?? null, imp.lastAt?.getTime() ?? null),
        importedBy: imp.importedBy,
        importedByName: name,
        importedAt: imp.importedAt.toISOString(),
        rejected: (report.rejected ?? []).slice(0, HISTORY_REJECTIONS),
        warnings: (report.warnings ?? []).map((w) => (typeof w === 'string' ? { code: 'note', message: w } : w)),
      };
    });
}

/** Rejected lines each import in the history shows; the import's own answer lists more. */
const HISTORY_REJECTIONS = 10;

/** `GET /api/dives/:diveId/telemetry`: the log thinned for the depth profile and the site plan. */
export function telemetrySamples(db: Db, diveId: string, { points: wanted }: z.output<typeof telemetryQuerySchema>): TelemetrySamples {
  const facts = diveFacts(db, diveId);
  const { series, times } = logOf(db, diveId);
  const { depth, temperature } = series.scalars;
  const maxGapMs = facts.gapMs;

  // The profile follows depth; a log without depth still draws its temperature over time.
  const base = depth.t.length > 0 ? depth : temperature;
  const picked = base.t.length >= 3 ? lttbIndices(base.t, base.v, wanted) : Array.from({ length: base.t.length }, (_, i) => i);
  const points = picked.map((i) => {
    const t = base.t[i] as number;
    const fix = sampleAt(series, t, { maxGapMs });
    return { t: iso(t), depth: fix.depth, temperature: fix.temperature };
  });

  const pos = series.position;
  const track = evenIndices(pos.t.length, wanted).map((i) => {
    const lat = pos.lat[i] as number;
    const lon = pos.lon[i] as number;
    const en = toLocalEN(facts.datum, { lat, lon });
    return { t: iso(pos.t[i] as number), lat, lon, east: en.eastM, north: en.northM };
  });

  return {
    diveId,
    sampleCount: times.length,
    span: spanOf(series.firstMs, series.lastMs),
    gapS: maxGapMs / 1000,
    channels: {
      depth: depth.t.length,
      position: pos.t.length,
      temperature: temperature.t.length,
      pressure: series.scalars.pressure.t.length,
      heading: series.scalars.heading.t.length,
      altitude: series.scalars.altitude.t.length,
      salinity: series.scalars.salinity.t.length,
    },
    points,
    track,
    gaps: gapsIn(times, maxGapMs, 200),
    imports: importHistory(db, diveId),
  };
}

/** `GET /api/dives/:diveId/summary`: the dive's statistics and its entries on the site plan. */
export function diveSummary(db: Db, diveId: string): DiveSummary {
  const facts = diveFacts(db, diveId);
  const { series } = logOf(db, diveId);
  const rows = db
    .select({
      id: observations.id,
      kind: observations.kind,
      title: observations.title,
      observedAt: observations.observedAt,
      depth: observations.depth,
      depthSource: observations.depthSource,
      lat: observations.lat,
      lon: observations.lon,
    })
    .from(observations)
    .where(and(eq(observations.diveId, diveId), eq(observations.retired, false)))
    .orderBy(asc(observations.observedAt), asc(observations.id))
    .all();
  const ids = rows.map((r) => r.id);
  const tagsBy = tagsOf(db, ids);
  const findBy = findNumbersOf(db, ids);

  // The figures count only the entries of the dive's own window: one logged months later (a
  // wrong date, a clock in local time) is listed apart rather than stretching the dive.
  const isoOrNull = (ms: number | null) => (ms === null ? null : iso(ms));
  const timing = {
    phases: {
      launch: isoOrNull(facts.phases.launch),
      onBottom: isoOrNull(facts.phases.onBottom),
      offBottom: isoOrNull(facts.phases.offBottom),
      onDeck: isoOrNull(facts.phases.onDeck),
    },
    plannedStartAt: isoOrNull(facts.plannedStartAt),
  };
  const outside = new Set(rows.filter((r) => isOutsideDive(timing, r.observedAt.toISOString())).map((r) => r.id));
  const inside = rows.filter((r) => !outside.has(r.id));
  const stats = diveStats(
    facts.phases,
    series,
    inside.map((r) => ({ kind: r.kind, tags: tagsBy.get(r.id) ?? [] })),
    { maxGapMs: facts.gapMs },
  );
  const placed = rows.map((r) => {
    const en = r.lat != null && r.lon != null ? toLocalEN(facts.datum, { lat: r.lat, lon: r.lon }) : null;
    return {
      id: r.id,
      kind: r.kind,
      title: r.title,
      observedAt: r.observedAt.toISOString(),
      depth: r.depth,
      depthSource: r.depthSource,
      east: en?.eastM ?? null,
      north: en?.northM ?? null,
      findNumber: findBy.get(r.id) ?? null,
      outsideDive: outside.has(r.id),
    };
  });
  const typedDepths = inside.map((r) => r.depth).filter((d): d is number => d != null);
  const maxDepth = stats.maxDepthM ?? (typedDepths.length > 0 ? Math.max(...typedDepths) : null);

  return {
    diveId,
    maxDepth,
    maxDepthSource: stats.maxDepthM !== null ? 'telemetry' : maxDepth !== null ? 'observations' : null,
    stats,
    span: spanOf(series.firstMs, series.lastMs),
    datum: facts.datum,
    observations: placed,
    finds: placed.flatMap((p) =>
      p.findNumber !== null ? [{ observationId: p.id, findNumber: p.findNumber, east: p.east, north: p.north }] : [],
    ),
  };
}

/** An entry as stamping reads it: id, time (ms), retired, depth, position, temperature, heading and altitude with their sources, rowid. */
type StampRow = [
  id: string,
  t: number,
  retired: number,
  depth: number | null,
  depthSource: string | null,
  lat: number | null,
  lon: number | null,
  positionSource: string | null,
  temperature: number | null,
  temperatureSource: string | null,
  heading: number | null,
  headingSource: string | null,
  altitude: number | null,
  altitudeSource: string | null,
  rowid: number,
];

/** Entries written per UPDATE while stamping. */
const STAMP_BATCH = 100;
const STAMP_COLUMNS = [
  'depth',
  'depth_source',
  'lat',
  'lon',
  'position_source',
  'temperature',
  'temperature_source',
  'heading',
  'heading_source',
  'altitude',
  'altitude_source',
] as const;

type StampQueries = { rows: (diveId: string) => StampRow[]; update: (rows: number, values: unknown[]) => void };
const stampStatements = new WeakMap<Db, StampQueries>();

function stampQueries(db: Db): StampQueries {
  let q = stampStatements.get(db);
  if (!q) {
    const rows = db.$client
      .prepare(
        `select id, observed_at, retired, depth, depth_source, lat, lon, position_source, temperature, temperature_source,
                heading, heading_source, altitude, altitude_source, rowid
         from observations where dive_id = ?`,
      )
      .raw();
    const updates = new Map<number, ReturnType<Db['$client']['prepare']>>();
    const updateOf = (n: number) => {
      let stmt = updates.get(n);
      if (!stmt) {
        const tuple = `(${Array(STAMP_COLUMNS.length + 1)
          .fill('?')
          .join(', ')})`;
        stmt = db.$client.prepare(
          `with v(rid, ${STAMP_COLUMNS.join(', ')}) as (values ${Array(n).fill(tuple).join(', ')})
           update observations set ${STAMP_COLUMNS.map((c) => `${c} = v.${c}`).join(', ')} from v where observations.rowid = v.rid`,
        );
        updates.set(n, stmt);
      }
      return stmt;
    };
    q = { rows: (diveId) => rows.all(diveId) as StampRow[], update: (n, values) => void updateOf(n).run(values) };
    stampStatements.set(db, q);
  }
  return q;
}

const NO_SAMPLES = { t: new Float64Array(0), v: new Float64Array(0) };

/** The series with only the channels an entry takes: lookups skip the others. */
function stampingView(series: TelemetrySeries): TelemetrySeries {
  return {
    ...series,
    scalars: { ...series.scalars, salinity: NO_SAMPLES, pressure: NO_SAMPLES },
  };
}

export type StampResult = {
  /** Entries whose values changed, with whether they are retired (retired ones are not announced). */
  changed: { id: string; retired: boolean }[];
  /** Live entries that take something from the log but find nothing there (a gap, or outside the log). */
  noTelemetry: number;
};

/**
 * Gives every entry of a dive the log's depth, position, temperature, heading and altitude at its time, except the
 * values a person typed (`manual`); where the log has nothing, the value becomes null with no
 * source rather than a guess. Neither `version` nor `updatedAt` changes: this is not an edit.
 * Runs inside the caller's transaction.
 */
export function stampDiveObservations(db: Db, diveId: string, series: TelemetrySeries, maxGapMs: number): StampResult {
  const view = stampingView(series);
  return stampEntries(db, stampQueries(db).rows(diveId), view, maxGapMs);
}

/** Entries stamped per reading of the stored log, and the most log time (merged windows) read at once. */
const STORED_CHUNK_ENTRIES = 1000;
const STORED_CHUNK_MS = 3600_000;

/**
 * The same stamping from the log as stored, without holding it whole: the entries are taken in
 * time order, a few hundred at a time, with only the stretches of log within one gap length of
 * each of them (which answer as the whole log would; see `seriesAround`). Memory stays that of an
 * hour of log however long it is. Runs inside the caller's transaction.
 */
export function stampDiveFromStoredLog(db: Db, diveId: string, maxGapMs: number): StampResult {
  const rows = stampQueries(db).rows(diveId);
  rows.sort((a, b) => a[1] - b[1]);
  const windowRows = windowQueries(db).rows;
  const result: StampResult = { changed: [], noTelemetry: 0 };
  for (let start = 0; start < rows.length;) {
    // Merged windows [t - gap, t + gap] of the next entries, up to the chunk's limits.
    const windows: [number, number][] = [];
    let span = 0;
    let end = start;
    while (end < rows.length && end - start < STORED_CHUNK_ENTRIES && span <= STORED_CHUNK_MS) {
      const t = rows[end]![1];
      const last = windows[windows.length - 1];
      if (last && t - maxGapMs <= last[1]) {
        span += t + maxGapMs - last[1];
        last[1] = t + maxGapMs;
      } else {
        windows.push([t - maxGapMs, t + maxGapMs]);
        span += 2 * maxGapMs;
      }
      end++;
    }
    const samples: TelemetryRow[] = [];
    for (const [from, to] of windows) for (const sample of windowRows(diveId, from, to)) samples.push(sample);
    const view = stampingView(buildTelemetrySeries(samples));
    const part = stampEntries(db, rows.slice(start, end), view, maxGapMs);
    for (const c of part.changed) result.changed.push(c);
    result.noTelemetry += part.noTelemetry;
    start = end;
  }
  return result;
}

/** Stamps `rows` from `view`, a series holding at least the log around each of them. */
function stampEntries(db: Db, rows: StampRow[], view: TelemetrySeries, maxGapMs: number): StampResult {
  const q = stampQueries(db);
  const options = { maxGapMs };
  const result: StampResult = { changed: [], noTelemetry: 0 };
  const width = STAMP_COLUMNS.length + 1;
  const batch: unknown[] = new Array(STAMP_BATCH * width);
  let filled = 0;
  const flush = () => {
    if (filled === 0) return;
    q.update(filled, filled === STAMP_BATCH ? batch : batch.slice(0, filled * width));
    filled = 0;
  };
  for (const row of rows) {
    const [
      id,
      t,
      retired,
      depth,
      depthSource,
      lat,
      lon,
      positionSource,
      temperature,
      temperatureSource,
      heading,
      headingSource,
      altitude,
      altitudeSource,
      rowid,
    ] = row;
    const keepDepth = depthSource === 'manual';
    const keepPosition = positionSource === 'manual';
    const keepTemperature = temperatureSource === 'manual';
    const keepHeading = headingSource === 'manual';
    const keepAltitude = altitudeSource === 'manual';
    if (keepDepth && keepPosition && keepTemperature && keepHeading && keepAltitude) continue;
    const fix = sampleAt(view, t, options);
    const hasPosition = fix.lat !== null && fix.lon !== null;
    if (!retired && fix.depth === null && !hasPosition && fix.temperature === null && fix.heading === null && fix.altitude === null) {
      result.noTelemetry++;
    }
    const nDepth = keepDepth ? depth : fix.depth;
    const nDepthSource = keepDepth ? 'manual' : fix.depth !== null ? 'telemetry' : null;
    const nLat = keepPosition ? lat : hasPosition ? fix.lat : null;
    const nLon = keepPosition ? lon : hasPosition ? fix.lon : null;
    const nPositionSource = keepPosition ? 'manual' : hasPosition ? 'telemetry' : null;
    const nTemperature = keepTemperature ? temperature : fix.temperature;
    const nTemperatureSource = keepTemperature ? 'manual' : fix.temperature !== null ? 'telemetry' : null;
    const nHeading = keepHeading ? heading : fix.heading;
    const nHeadingSource = keepHeading ? 'manual' : fix.heading !== null ? 'telemetry' : null;
    const nAltitude = keepAltitude ? altitude : fix.altitude;
    const nAltitudeSource = keepAltitude ? 'manual' : fix.altitude !== null ? 'telemetry' : null;
    if (
      nDepth === depth &&
      nDepthSource === depthSource &&
      nLat === lat &&
      nLon === lon &&
      nPositionSource === positionSource &&
      nTemperature === temperature &&
      nTemperatureSource === temperatureSource &&
      nHeading === heading &&
      nHeadingSource === headingSource &&
      nAltitude === altitude &&
      nAltitudeSource === altitudeSource
    ) {
      continue;
    }
    let o = filled * width;
    batch[o++] = rowid;
    batch[o++] = nDepth;
    batch[o++] = nDepthSource;
    batch[o++] = nLat;
    batch[o++] = nLon;
    batch[o++] = nPositionSource;
    batch[o++] = nTemperature;
    batch[o++] = nTemperatureSource;
    batch[o++] = nHeading;
    batch[o++] = nHeadingSource;
    batch[o++] = nAltitude;
    batch[o] = nAltitudeSource;
    filled++;
    result.changed.push({ id, retired: retired === 1 });
    if (filled === STAMP_BATCH) flush();
  }
  flush();
  return result;
}
