/**
 * Summary figures for one dive: phase durations, depths, rates, distance
 * travelled and what the notebook holds.
 *
 * Every figure is a finite number or null: null whenever an input it depends
 * on is missing, out of order or has no telemetry, so the app can print a
 * dash instead of "NaN".
 */
import { trackLengthM } from './geodesy';
import { sampleAt, timeRange, type TelemetrySeries } from './interpolate';

/** Phase marks of a dive, ms since epoch UTC; missing marks are null or absent. */
export interface DivePhases {
  /** Vehicle leaves the deck / enters the water. */
  launch?: number | null;
  /** Vehicle reaches the seabed. */
  onBottom?: number | null;
  /** Vehicle leaves the seabed. */
  offBottom?: number | null;
  /** Vehicle recovered on deck. */
  onDeck?: number | null;
}

/** The parts of an observation that the statistics count. */
export interface ObservationSummaryInput {
  kind: string;
  tags: readonly string[];
}

/** A label with the number of observations carrying it. */
export interface LabelCount {
  label: string;
  count: number;
}

/** Options for {@link diveStats}. */
export interface DiveStatsOptions {
  /** Passed to `sampleAt` when reading depth at the phase marks; default 30 000 ms. */
  maxGapMs?: number;
}

/** Summary of a dive. Durations are in ms, depths and distances in metres. */
export interface DiveStats {
  /** Launch → on bottom. */
  descentMs: number | null;
  /** On bottom → off bottom (bottom time). */
  bottomTimeMs: number | null;
  /** Off bottom → on deck. */
  ascentMs: number | null;
  /** Launch → on deck. */
  totalMs: number | null;
  /** Deepest depth sample, within launch..on deck where those are known. */
  maxDepthM: number | null;
  /** Mean descent rate, metres per minute, from the depth change launch → on bottom. */
  descentRateMPerMin: number | null;
  /** Mean ascent rate, metres per minute (positive going up), off bottom → on deck. */
  ascentRateMPerMin: number | null;
  /** Geodesic length of the position track, within launch..on deck where known; null with fewer than two fixes. */
  trackLengthM: number | null;
  /** Number of observations. */
  entryCount: number;
  /** Observations per kind, most frequent first, ties by label. */
  entriesByKind: LabelCount[];
  /** Observations per tag (a tag counted once per observation), most frequent first, ties by label. */
  entriesByTag: LabelCount[];
}

function mark(value: number | null | undefined): number | null {
  return typeof value === 'number' && Number.isFinite(value) ? value : null;
}

/** Elapsed ms from `from` to `to`, or null when either is missing or `to` precedes `from`. */
function span(from: number | null, to: number | null): number | null {
  if (from === null || to === null || to < from) return null;
  return to - from;
}

function depthAt(series: TelemetrySeries, tMs: number | null, maxGapMs: number | undefined): number | null {
  if (tMs === null) return null;
  return sampleAt(series, tMs, maxGapMs === undefined ? {} : { maxGapMs }).depth;
}

/** Rate in m/min of a depth change over a duration, or null when it cannot be formed. */
function rate(deltaM: number | null, durationMs: number | null): number | null {
  if (deltaM === null || durationMs === null || durationMs <= 0) return null;
  const r = deltaM / (durationMs / 60_000);
  return Number.isFinite(r) ? r : null;
}

function tally(labels: Iterable<string>, counts: Map<string, number>): void {
  for (const label of labels) counts.set(label, (counts.get(label) ?? 0) + 1);
}

function sortedCounts(counts: Map<string, number>): LabelCount[] {
  return [...counts]
    .map(([label, count]) => ({ label, count }))
    .sort((a, b) => b.count - a.count || (a.label < b.label ? -1 : a.label > b.label ? 1 : 0));
}

/**
 * Computes the summary of a dive from its phase marks, its telemetry and its
 * observations.
 *
 * Rates use the depth interpolated at the two phase marks, so they are null
 * when the log has no depth near either mark. The descent rate is positive
 * going down and the ascent rate positive going up.
 */
export function diveStats(
  phases: DivePhases,
  series: TelemetrySeries,
  observations: readonly ObservationSummaryInput[],
  options: DiveStatsOptions = {},
): DiveStats {
  const launch = mark(phases.launch);
  const onBottom = mark(phases.onBottom);
  const offBottom = mark(phases.offBottom);
  const onDeck = mark(phases.onDeck);

  const descentMs = span(launch, onBottom);
  const ascentMs = span(offBottom, onDeck);

  const windowFrom = launch ?? Number.NEGATIVE_INFINITY;
  const windowTo = onDeck ?? Number.POSITIVE_INFINITY;
  const windowValid = windowFrom <= windowTo;

  let maxDepthM: number | null = null;
  if (windowValid) {
    const depth = series.scalars.depth;
    const { start, end } = timeRange(depth.t, windowFrom, windowTo);
    for (let i = start; i < end; i++) {
      const d = depth.v[i] as number;
      if (maxDepthM === null || d > maxDepthM) maxDepthM = d;
    }
  }

  let track: number | null = null;
  if (windowValid) {
    const pos = series.position;
    const { start, end } = timeRange(pos.t, windowFrom, windowTo);
    if (end - start >= 2) {
      const points: { lat: number; lon: number }[] = [];
      for (let i = start; i < end; i++) points.push({ lat: pos.lat[i] as number, lon: pos.lon[i] as number });
      track = trackLengthM(points);
    }
  }

  const depthAtLaunch = depthAt(series, launch, options.maxGapMs);
  const depthAtOnBottom = depthAt(series, onBottom, options.maxGapMs);
  const depthAtOffBottom = depthAt(series, offBottom, options.maxGapMs);
  const depthAtOnDeck = depthAt(series, onDeck, options.maxGapMs);
  const descentDelta = depthAtLaunch !== null && depthAtOnBottom !== null ? depthAtOnBottom - depthAtLaunch : null;
  const ascentDelta = depthAtOffBottom !== null && depthAtOnDeck !== null ? depthAtOffBottom - depthAtOnDeck : null;

  const kinds = new Map<string, number>();
  const tags = new Map<string, number>();
  for (const o of observations) {
    tally([o.kind], kinds);
    tally(new Set(o.tags), tags);
  }

  return {
    descentMs,
    bottomTimeMs: span(onBottom, offBottom),
    ascentMs,
    totalMs: span(launch, onDeck),
    maxDepthM,
    descentRateMPerMin: rate(descentDelta, descentMs),
    ascentRateMPerMin: rate(ascentDelta, ascentMs),
    trackLengthM: track,
    entryCount: observations.length,
    entriesByKind: sortedCounts(kinds),
    entriesByTag: sortedCounts(tags),
  };
}
