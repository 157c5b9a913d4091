/**
 * A dive's telemetry log in memory: typed columns as read from a file or the database, the
 * interpolation series built from them, and a small cache so the charts and statistics of a
 * long log do not reread hundreds of thousands of rows on every request.
 */
import type { Db } from '../../db/client';
import {
  SCALAR_CHANNELS,
  type PositionColumn,
  type ScalarChannel,
  type ScalarColumn,
  type TelemetryRow,
  type TelemetrySeries,
} from '../../lib/interpolate';

/** The stored channels, in the table's column order after `dive_id` and `t`. */
export const STORED_CHANNELS = ['depth', 'pressure', 'lat', 'lon', 'heading', 'altitude', 'temperature', 'salinity'] as const;
export type StoredChannel = (typeof STORED_CHANNELS)[number];

/** A log as one Float64Array per column (NaN where a row lacks the channel), times ascending. */
export type TelemetryColumns = { readonly length: number; readonly t: Float64Array } & Readonly<Record<StoredChannel, Float64Array>>;

function emptyColumns(length: number): { t: Float64Array } & Record<StoredChannel, Float64Array> {
  const cols = { t: new Float64Array(length) } as { t: Float64Array } & Record<StoredChannel, Float64Array>;
  for (const c of STORED_CHANNELS) cols[c] = new Float64Array(length);
  return cols;
}

/** Collects samples into growing typed columns, so a long log costs no object per row once read. */
export class ColumnBuilder {
  private cols: ReturnType<typeof emptyColumns>;
  private capacity: number;
  length = 0;

  /** `expected`: about how many samples will come (from the file's size), so the columns rarely grow. */
  constructor(expected = 4096) {
    this.capacity = Math.max(4096, Math.ceil(expected));
    this.cols = emptyColumns(this.capacity);
  }

  push(sample: TelemetryRow): void {
    if (this.length === this.capacity) this.grow();
    const i = this.length++;
    const cols = this.cols;
    cols.t[i] = sample.t;
    for (const c of STORED_CHANNELS) {
      const v = sample[c];
      cols[c][i] = v ?? Number.NaN;
    }
  }

  /** The columns collected; views on the builder's buffers rather than copies, so a long log is not held twice. */
  finish(): TelemetryColumns {
    const n = this.length;
    const out = { length: n, t: this.cols.t.subarray(0, n) } as { length: number; t: Float64Array } & Record<StoredChannel, Float64Array>;
    for (const c of STORED_CHANNELS) out[c] = this.cols[c].subarray(0, n);
    this.cols = emptyColumns(0);
    this.capacity = 0;
    return out;
  }

  private grow() {
    const capacity = Math.max(4096, this.capacity * 2);
    const next = emptyColumns(capacity);
    next.t.set(this.cols.t);
    for (const c of STORED_CHANNELS) next[c].set(this.cols[c]);
    this.cols = next;
    this.capacity = capacity;
  }
}

/** Two logs with no time in common, interleaved by time. */
export function mergeColumns(a: TelemetryColumns, b: TelemetryColumns): TelemetryColumns {
  const n = a.length + b.length;
  const out = emptyColumns(n);
  let i = 0;
  let j = 0;
  for (let k = 0; k < n; k++) {
    const fromA = j >= b.length || (i < a.length && (a.t[i] as number) < (b.t[j] as number));
    const src = fromA ? a : b;
    const at = fromA ? i++ : j++;
    out.t[k] = src.t[at] as number;
    for (const c of STORED_CHANNELS) out[c][k] = src[c][at] as number;
  }
  return { length: n, ...out };
}

const wrapLongitude = (lon: number) => lon - 360 * Math.floor((lon + 180) / 360);
const wrapHeading = (deg: number) => deg - 360 * Math.floor(deg / 360);

/**
 * The interpolation series of a log, the same columns `buildTelemetrySeries` makes from row
 * objects, built straight from typed columns: a ten-hour log at 10 Hz would otherwise mean
 * 360,000 row objects just to be copied again. A channel present in every row (the usual case)
 * shares the log's own arrays instead of copying them.
 */
export function seriesFromColumns(cols: TelemetryColumns): TelemetrySeries {
  const n = cols.length;
  const scalars = {} as Record<ScalarChannel, ScalarColumn>;
  for (const c of SCALAR_CHANNELS) {
    const src = cols[c];
    let count = 0;
    let wrapped = true;
    for (let i = 0; i < n; i++) {
      const value = src[i] as number;
      if (!Number.isFinite(value)) continue;
      count++;
      if (c === 'heading' && (value < 0 || value >= 360)) wrapped = false;
    }
    if (count === n && wrapped) {
      scalars[c] = { t: cols.t, v: src };
      continue;
    }
    const t = new Float64Array(count);
    const v = new Float64Array(count);
    let k = 0;
    for (let i = 0; i < n; i++) {
      const value = src[i] as number;
      if (!Number.isFinite(value)) continue;
      t[k] = cols.t[i] as number;
      v[k++] = c === 'heading' ? wrapHeading(value) : value;
    }
    scalars[c] = { t, v };
  }
  const hasFix = (i: number) => {
    const lat = cols.lat[i] as number;
    return Number.isFinite(lat) && Number.isFinite(cols.lon[i]) && Math.abs(lat) <= 90;
  };
  let fixes = 0;
  let inRange = true;
  for (let i = 0; i < n; i++) {
    if (!hasFix(i)) continue;
    fixes++;
    if (Math.abs(cols.lon[i] as number) > 180) inRange = false;
  }
  let position: PositionColumn;
  if (fixes === n && inRange) {
    position = { t: cols.t, lat: cols.lat, lon: cols.lon };
  } else {
    position = { t: new Float64Array(fixes), lat: new Float64Array(fixes), lon: new Float64Array(fixes) };
    let p = 0;
    for (let i = 0; i < n; i++) {
      if (!hasFix(i)) continue;
      const lon = cols.lon[i] as number;
      position.t[p] = cols.t[i] as number;
      position.lat[p] = cols.lat[i] as number;
      position.lon[p++] = lon >= -180 && lon <= 180 ? lon : wrapLongitude(lon);
    }
  }
  let firstMs: number | null = null;
  let lastMs: number | null = null;
  for (let i = 0; i < n; i++) {
    if (hasFix(i) || SCALAR_CHANNELS.some((c) => Number.isFinite(cols[c][i]))) {
      firstMs = cols.t[i] as number;
      break;
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    if (hasFix(i) || SCALAR_CHANNELS.some((c) => Number.isFinite(cols[c][i]))) {
      lastMs = cols.t[i] as number;
      break;
    }
  }
  return { firstMs, lastMs, scalars, position };
}

const statements = new WeakMap<
  Db,
  {
    count: (diveId: string) => number;
    rows: (diveId: string) => IterableIterator<unknown[]>;
    times: (diveId: string) => IterableIterator<number>;
  }
>();

function queries(db: Db) {
  let q = statements.get(db);
  if (!q) {
    const count = db.$client.prepare('select count(*) from telemetry_samples where dive_id = ?').pluck();
    const rows = db.$client.prepare(`select t, ${STORED_CHANNELS.join(', ')} from telemetry_samples where dive_id = ? order by t`).raw();
    const times = db.$client.prepare('select t from telemetry_samples where dive_id = ? order by t').pluck();
    q = {
      count: (diveId) => count.get(diveId) as number,
      rows: (diveId) => rows.iterate(diveId) as IterableIterator<unknown[]>,
      times: (diveId) => times.iterate(diveId) as IterableIterator<number>,
    };
    statements.set(db, q);
  }
  return q;
}

/** How many samples a dive's stored log has. */
export function countSamples(db: Db, diveId: string): number {
  return queries(db).count(diveId);
}

/** The times of a dive's stored log, ascending: all an append needs to know of the log before it. */
export function loadTimes(db: Db, diveId: string): Float64Array {
  const q = queries(db);
  const times = new Float64Array(q.count(diveId));
  let i = 0;
  for (const t of q.times(diveId)) {
    if (i >= times.length) break;
    times[i++] = t;
  }
  return times.subarray(0, i);
}

/** The stored log of a dive as typed columns. */
export function loadColumns(db: Db, diveId: string): TelemetryColumns {
  const q = queries(db);
  const n = q.count(diveId);
  const cols = emptyColumns(n);
  let i = 0;
  for (const row of q.rows(diveId)) {
    if (i >= n) break;
    cols.t[i] = row[0] as number;
    for (let c = 0; c < STORED_CHANNELS.length; c++) {
      const v = row[c + 1];
      cols[STORED_CHANNELS[c] as StoredChannel][i] = typeof v === 'number' ? v : Number.NaN;
    }
    i++;
  }
  return { length: i, ...cols };
}

/** A dive's log ready for lookups: the series, and the time of every row (for gaps). */
export type LoadedLog = { series: TelemetrySeries; times: Float64Array };

const CACHED_DIVES = 4;
const cache = new WeakMap<Db, Map<string, LoadedLog>>();

export function loadedLog(cols: TelemetryColumns): LoadedLog {
  return { series: seriesFromColumns(cols), times: cols.t };
}

/** Keeps a log as the current one of its dive (the most recently used few are kept). */
export function rememberLog(db: Db, diveId: string, log: LoadedLog): LoadedLog {
  let byDive = cache.get(db);
  if (!byDive) cache.set(db, (byDive = new Map<string, LoadedLog>()));
  byDive.delete(diveId);
  byDive.set(diveId, log);
  while (byDive.size > CACHED_DIVES) byDive.delete(byDive.keys().next().value as string);
  return log;
}

/** Drops a dive's log from memory (its stored log changed); the next reader loads it again. */
export function forgetLog(db: Db, diveId: string): void {
  cache.get(db)?.delete(diveId);
}

/** The cached log of a dive, if it is in memory. */
export function cachedLog(db: Db, diveId: string): LoadedLog | undefined {
  const byDive = cache.get(db);
  const log = byDive?.get(diveId);
  if (log && byDive) {
    byDive.delete(diveId);
    byDive.set(diveId, log);
  }
  return log;
}

/** The log of a dive, from memory or read once from the database. */
export function logOf(db: Db, diveId: string): LoadedLog {
  return cachedLog(db, diveId) ?? rememberLog(db, diveId, loadedLog(loadColumns(db, diveId)));
}
