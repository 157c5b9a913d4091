import { describe, expect, it } from 'vitest';
import { diveStats, type DiveStats } from '../../lib/dive-stats';
import { buildTelemetrySeries, type TelemetryRow } from '../../lib/interpolate';

const MIN = 60_000;
const T0 = Date.UTC(2023, 10, 2, 22, 0, 0);
const PHASES = { launch: T0, onBottom: T0 + 10 * MIN, offBottom: T0 + 40 * MIN, onDeck: T0 + 60 * MIN };

/**
 * Synthetic dive, one sample a minute: descends 0 → 100 m in 10 min, works the
 * bottom at 100–107 m for 30 min, ascends 100 → 0 m in 20 min. The vehicle
 * moves east along the equator 0.0002° of longitude a minute. One stray
 * sample before launch and one after recovery lie far away and deep, to show
 * that they are left out.
 */
function diveRows(): TelemetryRow[] {
  const rows: TelemetryRow[] = [{ t: T0 - 5 * MIN, depth: 900, lat: 0, lon: -1 }];
  for (let m = 0; m <= 60; m++) {
    let depth: number;
    if (m <= 10) depth = 10 * m;
    else if (m < 40) depth = m === 25 ? 107 : 100 + (m % 3);
    else depth = 100 - 5 * (m - 40);
    rows.push({ t: T0 + m * MIN, depth, lat: 0, lon: m * 0.0002 });
  }
  rows.push({ t: T0 + 65 * MIN, depth: 950, lat: 0, lon: 1 });
  return rows;
}

function expectNoNaN(stats: DiveStats): void {
  for (const [key, value] of Object.entries(stats)) {
    if (typeof value === 'number') expect(Number.isNaN(value), key).toBe(false);
  }
}

describe('diveStats', () => {
  const series = buildTelemetrySeries(diveRows());

  it('computes durations between phases (computed by hand)', () => {
    const s = diveStats(PHASES, series, []);
    expect(s.descentMs).toBe(10 * MIN);
    expect(s.bottomTimeMs).toBe(30 * MIN);
    expect(s.ascentMs).toBe(20 * MIN);
    expect(s.totalMs).toBe(60 * MIN);
  });

  it('finds the maximum depth within launch..on deck (computed by hand)', () => {
    expect(diveStats(PHASES, series, []).maxDepthM).toBe(107);
  });

  it('computes mean descent and ascent rates (computed by hand)', () => {
    const s = diveStats(PHASES, series, []);
    // 100 m in 10 min down; 100 m in 20 min up
    expect(s.descentRateMPerMin).toBeCloseTo(10, 12);
    expect(s.ascentRateMPerMin).toBeCloseTo(5, 12);
  });

  it('uses depths interpolated at phase marks between samples (computed by hand)', () => {
    // On bottom half a minute early, at 9.5 min: depth 95 m, so 95 m in 9.5 min.
    // Samples are a minute apart, so the gap limit must allow a minute.
    const onBottom = T0 + 9.5 * MIN;
    const s = diveStats({ ...PHASES, onBottom }, series, [], { maxGapMs: MIN });
    expect(s.descentRateMPerMin).toBeCloseTo(10, 12);
    expect(s.descentMs).toBe(9.5 * MIN);
    // With the default 30 s limit the minute spacing counts as a gap
    expect(diveStats({ ...PHASES, onBottom }, series, []).descentRateMPerMin).toBeNull();
  });

  it('measures the track within launch..on deck', () => {
    // 60 legs × 0.0002° = 0.012° of equator at a = 6378137 m:
    // 6378137 × 0.012 × π/180 = 1335.834 m (computed by hand)
    expect(diveStats(PHASES, series, []).trackLengthM).toBeCloseTo(1335.834, 2);
  });

  it('uses the whole log when launch and on deck are unknown', () => {
    const s = diveStats({}, series, []);
    // The stray sample after recovery is the deepest in the whole log (computed by hand)
    expect(s.maxDepthM).toBe(950);
    expect(s.descentMs).toBeNull();
    expect(s.bottomTimeMs).toBeNull();
    expect(s.ascentMs).toBeNull();
    expect(s.totalMs).toBeNull();
    expect(s.descentRateMPerMin).toBeNull();
    expect(s.ascentRateMPerMin).toBeNull();
    // From −1° to +1° along the equator: 6378137 × 2 × π/180 = 222638.982 m (computed by hand)
    expect(s.trackLengthM).toBeCloseTo(222638.982, 2);
    expectNoNaN(s);
  });

  it('gives nulls, never NaN, without telemetry', () => {
    const s = diveStats(PHASES, buildTelemetrySeries([]), []);
    expect(s.maxDepthM).toBeNull();
    expect(s.trackLengthM).toBeNull();
    expect(s.descentRateMPerMin).toBeNull();
    expect(s.ascentRateMPerMin).toBeNull();
    // Phases alone give the total (computed by hand)
    expect(s.totalMs).toBe(60 * MIN);
    expectNoNaN(s);
  });

  it('gives null rates when depth is missing near a phase mark', () => {
    const gappy = buildTelemetrySeries(diveRows().filter((r) => r.t < T0 + 8 * MIN || r.t > T0 + 12 * MIN));
    const s = diveStats(PHASES, gappy, []);
    expect(s.descentRateMPerMin).toBeNull();
    expect(s.ascentRateMPerMin).toBeCloseTo(5, 12);
  });

  it('gives null durations for phases out of order and ignores non-finite marks', () => {
    const s = diveStats({ launch: T0 + 10 * MIN, onBottom: T0, offBottom: Number.NaN, onDeck: T0 + 60 * MIN }, series, []);
    expect(s.descentMs).toBeNull();
    expect(s.descentRateMPerMin).toBeNull();
    expect(s.bottomTimeMs).toBeNull();
    expect(s.ascentMs).toBeNull();
    // Launch at 10 min, on deck at 60 min (computed by hand)
    expect(s.totalMs).toBe(50 * MIN);
    expectNoNaN(s);
  });

  it('gives no depth or track when on deck precedes launch', () => {
    const s = diveStats({ launch: T0 + 60 * MIN, onDeck: T0 }, series, []);
    expect(s.totalMs).toBeNull();
    expect(s.maxDepthM).toBeNull();
    expect(s.trackLengthM).toBeNull();
  });

  it('gives a null track with fewer than two fixes in the window', () => {
    const s = diveStats({ launch: T0 + 30 * MIN, onDeck: T0 + 30 * MIN }, series, []);
    expect(s.trackLengthM).toBeNull();
    // The only sample in the window is minute 30: 100 + (30 mod 3) = 100 m (computed by hand)
    expect(s.maxDepthM).toBe(100);
  });

  it('counts entries per kind and per tag', () => {
    const s = diveStats(PHASES, series, [
      { kind: 'fauna', tags: ['coral', 'coral', 'hull'] },
      { kind: 'structure', tags: ['hull'] },
      { kind: 'fauna', tags: [] },
      { kind: 'artefact', tags: ['bell'] },
    ]);
    expect(s.entryCount).toBe(4);
    expect(s.entriesByKind).toEqual([
      { label: 'fauna', count: 2 },
      { label: 'artefact', count: 1 },
      { label: 'structure', count: 1 },
    ]);
    expect(s.entriesByTag).toEqual([
      { label: 'hull', count: 2 },
      { label: 'bell', count: 1 },
      { label: 'coral', count: 1 },
    ]);
  });

  it('counts labels that look like object keys', () => {
    const s = diveStats({}, series, [{ kind: '__proto__', tags: ['constructor'] }]);
    expect(s.entriesByKind).toEqual([{ label: '__proto__', count: 1 }]);
    expect(s.entriesByTag).toEqual([{ label: 'constructor', count: 1 }]);
  });
});
