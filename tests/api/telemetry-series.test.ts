/**
 * The server builds its interpolation series straight from typed columns; the reference for
 * what that series must be is the shared library's `buildTelemetrySeries` over row objects.
 */
import { describe, expect, it } from 'vitest';

import { buildTelemetrySeries, sampleAt, type TelemetryRow, type TelemetrySeries } from '@/lib/interpolate';
import { ColumnBuilder, mergeColumns, seriesFromColumns, type TelemetryColumns } from '@/server/services/telemetry-series';
import { pathAcrossGaps, targetSizes, ticks, ticksOf, timeTicks, niceCeil, niceStep } from '@/components/telemetry/plot-scale';

function columnsOf(rows: TelemetryRow[]): TelemetryColumns {
  const b = new ColumnBuilder();
  for (const r of rows) b.push(r);
  return b.finish();
}

function plain(series: TelemetrySeries) {
  const arr = (a: Float64Array) => Array.from(a);
  return {
    firstMs: series.firstMs,
    lastMs: series.lastMs,
    scalars: Object.fromEntries(Object.entries(series.scalars).map(([k, c]) => [k, { t: arr(c.t), v: arr(c.v) }])),
    position: { t: arr(series.position.t), lat: arr(series.position.lat), lon: arr(series.position.lon) },
  };
}

const T = Date.UTC(2026, 4, 13, 20, 0, 0);

describe('series from typed columns', () => {
  it('equals buildTelemetrySeries for a log with every channel in every row', () => {
    const rows: TelemetryRow[] = Array.from({ length: 50 }, (_, k) => ({
      t: T + k * 1000,
      depth: 590 + k / 10,
      pressure: 595 + k / 10,
      lat: 36.145 + k * 1e-6,
      lon: -7.432 - k * 1e-6,
      heading: (k * 10) % 360,
      altitude: 2 + k / 100,
      temperature: 10.8,
      salinity: 35.7,
    }));
    expect(plain(seriesFromColumns(columnsOf(rows)))).toEqual(plain(buildTelemetrySeries(rows)));
  });

  it('equals buildTelemetrySeries for sparse channels, unwrapped headings and longitudes, and impossible latitudes', () => {
    const rows: TelemetryRow[] = [
      { t: T, depth: 10, heading: 370 },
      { t: T + 1000, temperature: 11.2, lat: 36.1, lon: 181 },
      { t: T + 2000, lat: 95, lon: -7.4, heading: -10 },
      { t: T + 3000, lat: 36.2, depth: 12 },
      { t: T + 4000, salinity: 35.1, lat: 36.3, lon: -7.5 },
      { t: T + 5000 },
    ];
    const series = seriesFromColumns(columnsOf(rows));
    expect(plain(series)).toEqual(plain(buildTelemetrySeries(rows)));
    expect(Array.from(series.scalars.heading.v)).toEqual([10, 350]);
    expect(Array.from(series.position.lon)).toEqual([-179, -7.5]);
    expect(series.lastMs).toBe(T + 4000);
  });

  it('answers sampleAt the same way', () => {
    const rows: TelemetryRow[] = Array.from({ length: 30 }, (_, k) =>
      k > 10 && k < 20 ? { t: T + k * 5000, temperature: 10 + k / 100 } : { t: T + k * 5000, depth: 500 + k, lat: 36 + k * 1e-5, lon: -7 },
    );
    const ours = seriesFromColumns(columnsOf(rows));
    const reference = buildTelemetrySeries(rows);
    for (let ms = T - 5000; ms < T + 160_000; ms += 2500) {
      expect(sampleAt(ours, ms, { maxGapMs: 30_000 })).toEqual(sampleAt(reference, ms, { maxGapMs: 30_000 }));
    }
  });

  it('merges two logs by time', () => {
    const a = columnsOf([
      { t: T, depth: 1 },
      { t: T + 20, depth: 3 },
    ]);
    const b = columnsOf([
      { t: T + 10, depth: 2 },
      { t: T + 30, temperature: 9 },
    ]);
    const merged = mergeColumns(a, b);
    expect(Array.from(merged.t)).toEqual([T, T + 10, T + 20, T + 30]);
    expect(Array.from(merged.depth)).toEqual([1, 2, 3, Number.NaN]);
    expect(Array.from(merged.temperature)).toEqual([Number.NaN, Number.NaN, Number.NaN, 9]);
  });
});

describe('plot axes', () => {
  it('picks steps of 1, 2 or 5 times a power of ten', () => {
    for (const span of [0.7, 3, 12, 47, 95, 612, 1234, 9712]) {
      const step = niceStep(span, 5);
      const mantissa = step / 10 ** Math.floor(Math.log10(step) + 1e-9);
      expect([1, 2, 5]).toContain(Number(mantissa.toFixed(6)));
      expect(span / step).toBeGreaterThanOrEqual(2);
      expect(span / step).toBeLessThanOrEqual(10);
    }
    expect(niceCeil(598.2)).toBe(600);
    expect(niceCeil(612)).toBe(700);
    expect(niceCeil(3)).toBe(10);
  });

  it('gives ticks inside the range, evenly spaced, free of floating-point crumbs', () => {
    expect(ticks(0, 600, 5)).toEqual([0, 100, 200, 300, 400, 500, 600]);
    expect(ticksOf(577.3, 591.8, 2)).toEqual([578, 580, 582, 584, 586, 588, 590]);
    expect(ticksOf(0.1, 0.5, 0.1)).toEqual([0.1, 0.2, 0.3, 0.4, 0.5]);
    expect(ticksOf(-43.2, 61.9, 20)).toEqual([-40, -20, 0, 20, 40, 60]);
  });

  it('puts time ticks on whole UTC minutes and hours', () => {
    const from = Date.UTC(2026, 4, 13, 17, 38, 12);
    const to = Date.UTC(2026, 4, 13, 23, 2, 40);
    const { step, ticks: at } = timeTicks(from, to, 6);
    expect(step).toBe(3600_000);
    expect(at.map((t) => new Date(t).toISOString().slice(11, 19))).toEqual([
      '18:00:00',
      '19:00:00',
      '20:00:00',
      '21:00:00',
      '22:00:00',
      '23:00:00',
    ]);
    expect(timeTicks(from, from + 90_000, 4).step).toBe(30_000);
  });

  it('lifts the pen across a gap of the log and nowhere else', () => {
    const p = (t: number) => ({ t, x: t, y: 0 });
    expect(pathAcrossGaps([p(0), p(10), p(20), p(60), p(70)], [{ from: 20, to: 60 }])).toBe('M0.0 0.0L10.0 0.0L20.0 0.0M60.0 0.0L70.0 0.0');
    expect(pathAcrossGaps([p(0), p(10), p(70)], [{ from: 20, to: 60 }])).toBe('M0.0 0.0L10.0 0.0M70.0 0.0');
    expect(pathAcrossGaps([p(0), p(10)], [])).toBe('M0.0 0.0L10.0 0.0');
  });

  it('shrinks touch targets so that no marker covers the centre of another', () => {
    const points = [
      { x: 0, y: 0 },
      { x: 10, y: 0 },
      { x: 100, y: 0 },
      { x: 103, y: 4 },
      { x: 200, y: 50 },
    ];
    const sizes = targetSizes(points, 28, 12);
    expect(sizes).toEqual([12, 12, 12, 12, 28]);
    const spaced = targetSizes(
      [
        { x: 0, y: 0 },
        { x: 20, y: 0 },
      ],
      28,
      12,
    );
    expect(spaced).toEqual([20, 20]);
    for (const [i, a] of [
      { x: 0, y: 0 },
      { x: 20, y: 0 },
    ].entries()) {
      const other = i === 0 ? { x: 20, y: 0 } : { x: 0, y: 0 };
      expect(Math.abs(other.x - a.x) >= spaced[i]! / 2 || Math.abs(other.y - a.y) >= spaced[i]! / 2).toBe(true);
    }
  });
});
