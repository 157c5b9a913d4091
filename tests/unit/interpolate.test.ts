import { describe, expect, it } from 'vitest';
import {
  DEFAULT_MAX_GAP_MS,
  buildTelemetrySeries,
  lowerBound,
  sampleAt,
  timeRange,
  upperBound,
  type TelemetryRow,
} from '../../lib/interpolate';

const T0 = Date.UTC(2024, 2, 14, 9, 0, 0);

// Synthetic log: all expected values below are computed by hand from these rows
const ROWS: TelemetryRow[] = [
  { t: T0, depth: 100, lat: -41, lon: 174, temperature: 10, heading: 350 },
  { t: T0 + 10_000, depth: 110, lat: -41.001, lon: 174.002, heading: 10 },
  { t: T0 + 20_000, depth: 130, lat: null, lon: null, temperature: 8 },
  { t: T0 + 30_000, depth: 120, lat: -41.003, lon: 174.006, temperature: null },
];

describe('buildTelemetrySeries', () => {
  it('stores each channel with only the rows that carry it', () => {
    const s = buildTelemetrySeries(ROWS);
    expect(Array.from(s.scalars.depth.v)).toEqual([100, 110, 130, 120]);
    expect(Array.from(s.scalars.temperature.t)).toEqual([T0, T0 + 20_000]);
    expect(Array.from(s.position.t)).toEqual([T0, T0 + 10_000, T0 + 30_000]);
    expect(s.scalars.salinity.t.length).toBe(0);
    expect(s.firstMs).toBe(T0);
    expect(s.lastMs).toBe(T0 + 30_000);
  });

  it('sorts rows by time, keeping input order among equal times', () => {
    const s = buildTelemetrySeries([
      { t: 3, depth: 30 },
      { t: 1, depth: 10 },
      { t: 2, depth: 20 },
      { t: 2, depth: 21 },
    ]);
    expect(Array.from(s.scalars.depth.t)).toEqual([1, 2, 2, 3]);
    expect(Array.from(s.scalars.depth.v)).toEqual([10, 20, 21, 30]);
  });

  it('drops rows without a finite time and values that are not finite', () => {
    const s = buildTelemetrySeries([
      { t: Number.NaN, depth: 5 },
      { t: 1, depth: Number.NaN, temperature: Number.POSITIVE_INFINITY },
      { t: 2, depth: 7 },
    ]);
    expect(Array.from(s.scalars.depth.t)).toEqual([2]);
    expect(s.scalars.temperature.t.length).toBe(0);
    expect(s.firstMs).toBe(2);
  });

  it('keeps a position only when both coordinates are usable, wrapping longitude', () => {
    const s = buildTelemetrySeries([
      { t: 1, lat: 10 },
      { t: 2, lon: 20 },
      { t: 3, lat: 91, lon: 20 },
      { t: 4, lat: 10, lon: 190 },
    ]);
    expect(Array.from(s.position.t)).toEqual([4]);
    // 190° E is 170° W (computed by hand)
    expect(s.position.lon[0]).toBe(-170);
    expect(s.firstMs).toBe(4);
  });

  it('gives an empty series for no usable rows', () => {
    const s = buildTelemetrySeries([{ t: 5 }]);
    expect(s.firstMs).toBeNull();
    expect(s.lastMs).toBeNull();
  });
});

describe('sampleAt', () => {
  const series = buildTelemetrySeries(ROWS);

  it('returns a sample exactly when the instant hits it', () => {
    const fix = sampleAt(series, T0 + 10_000);
    expect(fix).toEqual({
      depth: 110,
      lat: -41.001,
      lon: 174.002,
      temperature: 9, // halfway between 10 at T0 and 8 at T0+20 s (computed by hand)
      heading: 10,
      altitude: null,
      salinity: null,
      pressure: null,
      noTelemetry: null,
    });
  });

  it('interpolates linearly between samples', () => {
    const fix = sampleAt(series, T0 + 25_000);
    // depth 130 → 120 over 10 s, 5 s in: 125 (computed by hand)
    expect(fix.depth).toBeCloseTo(125, 12);
    // position fixes at T0+10 s and T0+30 s, 15 s of 20 s in: lat −41.00250, lon 174.005 (computed by hand)
    expect(fix.lat).toBeCloseTo(-41.0025, 12);
    expect(fix.lon).toBeCloseTo(174.005, 12);
    expect(fix.temperature).toBeNull();
  });

  it('turns heading the short way through north', () => {
    // 350° → 10° over 10 s: 2.5 s in is 355°, 5 s in is 0°, 7.5 s in is 5° (computed by hand)
    expect(sampleAt(series, T0 + 2_500).heading).toBeCloseTo(355, 12);
    expect(sampleAt(series, T0 + 5_000).heading).toBeCloseTo(0, 12);
    expect(sampleAt(series, T0 + 7_500).heading).toBeCloseTo(5, 12);
  });

  it('crosses the antimeridian the short way', () => {
    const s = buildTelemetrySeries([
      { t: 0, lat: 0, lon: 179.9 },
      { t: 1000, lat: 0, lon: -179.9 },
    ]);
    // 0.2° apart across ±180°: a quarter of the way is 179.95°, three quarters is −179.95° (computed by hand)
    expect(sampleAt(s, 250).lon).toBeCloseTo(179.95, 10);
    expect(sampleAt(s, 750).lon).toBeCloseTo(-179.95, 10);
    // Halfway is the antimeridian itself (computed by hand)
    expect(Math.abs(sampleAt(s, 500).lon ?? 0)).toBeCloseTo(180, 10);
  });

  it('gives null for a channel whose bracketing samples are too far apart', () => {
    const s = buildTelemetrySeries([
      { t: 0, depth: 10, temperature: 5 },
      { t: 20_000, depth: 20 },
      { t: 60_000, depth: 30, temperature: 7 },
    ]);
    const fix = sampleAt(s, 30_000);
    expect(fix.depth).toBeNull();
    expect(fix.temperature).toBeNull();
    expect(fix.noTelemetry).toBe('gap');
    const wider = sampleAt(s, 30_000, { maxGapMs: 60_000 });
    // depth 20 → 30 over 40 s, 10 s in: 22.5; temperature 5 → 7 over 60 s, 30 s in: 6 (computed by hand)
    expect(wider.depth).toBeCloseTo(22.5, 12);
    expect(wider.temperature).toBeCloseTo(6, 12);
    expect(wider.noTelemetry).toBeNull();
  });

  it('still interpolates across a gap exactly equal to maxGapMs', () => {
    const s = buildTelemetrySeries([
      { t: 0, depth: 0 },
      { t: DEFAULT_MAX_GAP_MS, depth: 30 },
    ]);
    // 0 → 30 m over the whole gap, a third of the way in: 10 m (computed by hand)
    expect(sampleAt(s, DEFAULT_MAX_GAP_MS / 3).depth).toBeCloseTo(10, 12);
    expect(sampleAt(s, 1, { maxGapMs: DEFAULT_MAX_GAP_MS - 1 }).depth).toBeNull();
  });

  it('says why there is no telemetry before, after and without samples', () => {
    expect(sampleAt(series, T0 - 1).noTelemetry).toBe('before-first-sample');
    expect(sampleAt(series, T0 + 30_001).noTelemetry).toBe('after-last-sample');
    const empty = sampleAt(buildTelemetrySeries([]), T0);
    expect(empty.noTelemetry).toBe('empty-series');
    expect(empty.depth).toBeNull();
    expect(empty.lat).toBeNull();
  });

  it('answers at the first and last sample themselves', () => {
    // First and last rows of the synthetic log
    expect(sampleAt(series, T0).depth).toBe(100);
    expect(sampleAt(series, T0 + 30_000).depth).toBe(120);
  });

  it('rejects a non-finite instant or a negative gap', () => {
    expect(() => sampleAt(series, Number.NaN)).toThrow(RangeError);
    expect(() => sampleAt(series, T0, { maxGapMs: -1 })).toThrow(RangeError);
  });

  it('answers many lookups in a long log correctly', () => {
    // 360 000 samples at 1 Hz (a 100 h log) with depth = seconds / 100 and a
    // temperature only every 7th row: interpolation is exact by construction, up to
    // the 0.24 µs spacing of doubles near 1.7e12 ms, hence 6 decimal places
    const n = 360_000;
    const rows: TelemetryRow[] = [];
    for (let i = 0; i < n; i++) {
      rows.push({ t: T0 + i * 1000, depth: i / 100, temperature: i % 7 === 0 ? i : null });
    }
    const big = buildTelemetrySeries(rows);
    for (let k = 0; k < 10_000; k++) {
      const sec = (k * 35.9713) % (n - 1);
      const fix = sampleAt(big, T0 + sec * 1000);
      expect(fix.depth).toBeCloseTo(sec / 100, 6);
      expect(fix.temperature).toBeCloseTo(sec, 3);
    }
  });
});

describe('binary search helpers', () => {
  const times = [1, 2, 2, 2, 5, 9];

  it('finds bounds', () => {
    expect(lowerBound(times, 2)).toBe(1);
    expect(upperBound(times, 2)).toBe(4);
    expect(lowerBound(times, 0)).toBe(0);
    expect(upperBound(times, 9)).toBe(6);
    expect(lowerBound(times, 10)).toBe(6);
  });

  it('gives the inclusive time range', () => {
    expect(timeRange(times, 2, 5)).toEqual({ start: 1, end: 5 });
    expect(timeRange(times, 6, 8)).toEqual({ start: 5, end: 5 });
    expect(timeRange(times, 8, 6)).toEqual({ start: 5, end: 5 });
  });
});
