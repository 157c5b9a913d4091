/**
 * Telemetry series and "what was the vehicle doing at instant t" lookups.
 *
 * A vehicle log is kept columnar: each channel holds its own pair of
 * `Float64Array`s (sample times and values) containing only the rows in which
 * that channel was present. Rows in which a sensor dropped out therefore cost
 * nothing, and a lookup is one binary search per channel — O(log n) however
 * sparse a channel is — instead of a scan for the nearest non-missing value.
 * Latitude and longitude form a single position channel, so every stored fix
 * has both coordinates from the same row.
 */

import { interpolateHeading, wrapHeading } from './heading';

/** Channels carried as a single number per sample. */
export const SCALAR_CHANNELS = ['depth', 'temperature', 'heading', 'altitude', 'salinity', 'pressure'] as const;

/** A scalar telemetry channel. */
export type ScalarChannel = (typeof SCALAR_CHANNELS)[number];

/**
 * One telemetry record as read from a vehicle log. Channels absent from the
 * row are `undefined` or `null`.
 */
export interface TelemetryRow {
  /** Sample time, ms since epoch UTC. */
  t: number;
  /** Depth in metres, positive down. */
  depth?: number | null;
  /** Latitude in degrees (WGS 84). */
  lat?: number | null;
  /** Longitude in degrees (WGS 84). */
  lon?: number | null;
  /** Water temperature in °C. */
  temperature?: number | null;
  /** Heading in degrees clockwise from north, 0–360. */
  heading?: number | null;
  /** Height above the seabed in metres. */
  altitude?: number | null;
  /** Practical salinity (PSS-78, unitless). */
  salinity?: number | null;
  /** Sea pressure in dbar. */
  pressure?: number | null;
}

/** The samples of one scalar channel, sorted by time. */
export interface ScalarColumn {
  /** Sample times, ms since epoch UTC, ascending. */
  readonly t: Float64Array;
  /** Values, parallel to `t`. */
  readonly v: Float64Array;
}

/** The position fixes of a series, sorted by time. */
export interface PositionColumn {
  /** Fix times, ms since epoch UTC, ascending. */
  readonly t: Float64Array;
  /** Latitudes in degrees, parallel to `t`. */
  readonly lat: Float64Array;
  /** Longitudes in degrees, −180..180, parallel to `t`. */
  readonly lon: Float64Array;
}

/** A telemetry log in columnar form; build it with {@link buildTelemetrySeries}. */
export interface TelemetrySeries {
  /** Time of the first row carrying any channel, ms UTC; null for an empty series. */
  readonly firstMs: number | null;
  /** Time of the last row carrying any channel, ms UTC; null for an empty series. */
  readonly lastMs: number | null;
  readonly scalars: Readonly<Record<ScalarChannel, ScalarColumn>>;
  readonly position: PositionColumn;
}

/** Why {@link sampleAt} found no telemetry at all at an instant. */
export type NoTelemetryReason = 'empty-series' | 'before-first-sample' | 'after-last-sample' | 'gap';

/** Telemetry at one instant. Each channel is null where it cannot be given. */
export interface TelemetryFix {
  depth: number | null;
  lat: number | null;
  lon: number | null;
  temperature: number | null;
  heading: number | null;
  altitude: number | null;
  salinity: number | null;
  pressure: number | null;
  /** Set when every channel is null, saying why; null otherwise. */
  noTelemetry: NoTelemetryReason | null;
}

/** Options for {@link sampleAt}. */
export interface SampleOptions {
  /**
   * Largest spacing in ms between the two samples bracketing the instant over
   * which a channel is still interpolated; wider gaps give null. Default 30 000.
   */
  maxGapMs?: number;
}

/** Default for {@link SampleOptions.maxGapMs}: 30 s. */
export const DEFAULT_MAX_GAP_MS = 30_000;

function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

/** Longitude wrapped into [−180, 180). */
function wrapLongitude(lonDeg: number): number {
  return lonDeg - 360 * Math.floor((lonDeg + 180) / 360);
}

/** Signed smallest turn from a to b in degrees, [−180, 180). */
function angleDelta(aDeg: number, bDeg: number): number {
  return wrapLongitude(bDeg - aDeg);
}

/**
 * Builds a columnar series from row objects. Rows may arrive in any order
 * (they are sorted by time, keeping the input order among equal times); rows
 * with a non-finite time are dropped, as are non-finite values. A position is
 * kept only when both coordinates are finite and |lat| ≤ 90°; longitudes
 * outside ±180° are wrapped.
 */
export function buildTelemetrySeries(rows: readonly TelemetryRow[]): TelemetrySeries {
  let ordered = rows.filter((r) => isFiniteNumber(r.t));
  let sorted = true;
  for (let i = 1; i < ordered.length; i++) {
    if ((ordered[i] as TelemetryRow).t < (ordered[i - 1] as TelemetryRow).t) {
      sorted = false;
      break;
    }
  }
  if (!sorted) ordered = [...ordered].sort((a, b) => a.t - b.t);

  const hasPosition = (r: TelemetryRow): boolean => isFiniteNumber(r.lat) && isFiniteNumber(r.lon) && Math.abs(r.lat) <= 90;

  // Counting first lets every column be allocated at its exact size, so a long
  // log with sparse channels does not keep row-sized buffers alive.
  const counts = Object.fromEntries(SCALAR_CHANNELS.map((c) => [c, 0])) as Record<ScalarChannel, number>;
  let positionCount = 0;
  let firstMs: number | null = null;
  let lastMs: number | null = null;
  for (const r of ordered) {
    let any = false;
    for (const c of SCALAR_CHANNELS) {
      if (isFiniteNumber(r[c])) {
        counts[c]++;
        any = true;
      }
    }
    if (hasPosition(r)) {
      positionCount++;
      any = true;
    }
    if (any) {
      firstMs ??= r.t;
      lastMs = r.t;
    }
  }

  const scalars = Object.fromEntries(
    SCALAR_CHANNELS.map((c) => [c, { t: new Float64Array(counts[c]), v: new Float64Array(counts[c]) }]),
  ) as Record<ScalarChannel, ScalarColumn>;
  const position: PositionColumn = {
    t: new Float64Array(positionCount),
    lat: new Float64Array(positionCount),
    lon: new Float64Array(positionCount),
  };
  const fill = Object.fromEntries(SCALAR_CHANNELS.map((c) => [c, 0])) as Record<ScalarChannel, number>;
  let p = 0;
  for (const r of ordered) {
    for (const c of SCALAR_CHANNELS) {
      const value = r[c];
      if (isFiniteNumber(value)) {
        const col = scalars[c];
        const k = fill[c]++;
        col.t[k] = r.t;
        col.v[k] = c === 'heading' ? wrapHeading(value) : value;
      }
    }
    if (hasPosition(r)) {
      const lon = r.lon as number;
      position.t[p] = r.t;
      position.lat[p] = r.lat as number;
      position.lon[p] = lon >= -180 && lon <= 180 ? lon : wrapLongitude(lon);
      p++;
    }
  }
  return { firstMs, lastMs, scalars, position };
}

/**
 * Index of the first element of an ascending array greater than `value`
 * (the length when there is none).
 */
export function upperBound(sorted: ArrayLike<number>, value: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((sorted[mid] as number) <= value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Index of the first element of an ascending array not less than `value`
 * (the length when there is none).
 */
export function lowerBound(sorted: ArrayLike<number>, value: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((sorted[mid] as number) < value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Half-open index range `[start, end)` of the samples of an ascending time
 * array that fall within `[fromMs, toMs]` (inclusive at both ends).
 */
export function timeRange(times: ArrayLike<number>, fromMs: number, toMs: number): { start: number; end: number } {
  const start = lowerBound(times, fromMs);
  const end = Math.max(start, upperBound(times, toMs));
  return { start, end };
}

interface Bracket {
  /** Index of the sample at or before the instant. */
  i: number;
  /** Interpolation weight of the following sample; 0 for an exact hit. */
  f: number;
}

/** Same as {@link upperBound}, kept monomorphic on Float64Array for the hot lookup path. */
function upperBoundF64(sorted: Float64Array, value: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((sorted[mid] as number) <= value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Locates the instant within one channel's times, or null when the channel cannot answer. */
function bracket(times: Float64Array, tMs: number, maxGapMs: number): Bracket | null {
  if (times.length === 0) return null;
  const i = upperBoundF64(times, tMs) - 1;
  if (i < 0) return null;
  const ti = times[i] as number;
  if (ti === tMs) return { i, f: 0 };
  if (i + 1 >= times.length) return null;
  const tj = times[i + 1] as number;
  if (tj - ti > maxGapMs) return null;
  return { i, f: (tMs - ti) / (tj - ti) };
}

function scalarAt(col: ScalarColumn, channel: ScalarChannel, tMs: number, maxGapMs: number): number | null {
  const b = bracket(col.t, tMs, maxGapMs);
  if (b === null) return null;
  const a = col.v[b.i] as number;
  if (b.f === 0) return a;
  const next = col.v[b.i + 1] as number;
  if (channel === 'heading') return interpolateHeading(a, next, b.f);
  return a + b.f * (next - a);
}

/**
 * Telemetry at an instant, interpolated linearly per channel between the
 * nearest samples that carry that channel. A sample exactly at the instant is
 * returned as is. Longitude and heading are interpolated the short way round,
 * so a track crossing the antimeridian (179.9° → −179.9°) stays near ±180°.
 *
 * A channel is null when the instant lies outside its samples or when the two
 * samples bracketing it are more than `maxGapMs` apart. When every channel is
 * null, `noTelemetry` says why.
 *
 * @param series the log, from {@link buildTelemetrySeries}
 * @param tMs the instant, ms since epoch UTC
 * @throws RangeError when `tMs` is not finite or `maxGapMs` is negative or NaN
 */
export function sampleAt(series: TelemetrySeries, tMs: number, options: SampleOptions = {}): TelemetryFix {
  const maxGapMs = options.maxGapMs ?? DEFAULT_MAX_GAP_MS;
  if (!Number.isFinite(tMs)) throw new RangeError('sampleAt: the instant must be a finite number of ms');
  if (Number.isNaN(maxGapMs) || maxGapMs < 0) throw new RangeError('sampleAt: maxGapMs must be ≥ 0');

  const fix: TelemetryFix = {
    depth: scalarAt(series.scalars.depth, 'depth', tMs, maxGapMs),
    lat: null,
    lon: null,
    temperature: scalarAt(series.scalars.temperature, 'temperature', tMs, maxGapMs),
    heading: scalarAt(series.scalars.heading, 'heading', tMs, maxGapMs),
    altitude: scalarAt(series.scalars.altitude, 'altitude', tMs, maxGapMs),
    salinity: scalarAt(series.scalars.salinity, 'salinity', tMs, maxGapMs),
    pressure: scalarAt(series.scalars.pressure, 'pressure', tMs, maxGapMs),
    noTelemetry: null,
  };

  const pos = series.position;
  const b = bracket(pos.t, tMs, maxGapMs);
  if (b !== null) {
    const lat = pos.lat[b.i] as number;
    const lon = pos.lon[b.i] as number;
    if (b.f === 0) {
      fix.lat = lat;
      fix.lon = lon;
    } else {
      const nextLat = pos.lat[b.i + 1] as number;
      const nextLon = pos.lon[b.i + 1] as number;
      fix.lat = lat + b.f * (nextLat - lat);
      fix.lon = wrapLongitude(lon + b.f * angleDelta(lon, nextLon));
    }
  }

  const allNull =
    fix.lat === null &&
    fix.depth === null &&
    fix.temperature === null &&
    fix.heading === null &&
    fix.altitude === null &&
    fix.salinity === null &&
    fix.pressure === null;
  if (allNull) {
    if (series.firstMs === null || series.lastMs === null) fix.noTelemetry = 'empty-series';
    else if (tMs < series.firstMs) fix.noTelemetry = 'before-first-sample';
    else if (tMs > series.lastMs) fix.noTelemetry = 'after-last-sample';
    else fix.noTelemetry = 'gap';
  }
  return fix;
}
