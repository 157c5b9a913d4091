import { describe, expect, it } from 'vitest';
import { lttb, lttbIndices, type XY } from '../../lib/downsample';

function sine(n: number): XY[] {
  return Array.from({ length: n }, (_, i) => ({ x: i, y: Math.sin((i / n) * 6 * Math.PI) }));
}

describe('lttb', () => {
  it('returns the input itself when it has no more points than the threshold', () => {
    const pts = sine(10);
    expect(lttb(pts, 10)).toBe(pts);
    expect(lttb(pts, 500)).toBe(pts);
    // Fewer points than the threshold: nothing to drop (Steinarsson 2013)
    expect(lttbIndices([1, 2], [3, 4], 3)).toEqual([0, 1]);
  });

  it('returns exactly threshold points, first and last included, in order', () => {
    // One point per bucket plus both ends (Steinarsson 2013, LTTB definition)
    for (const [n, threshold] of [
      [1000, 3],
      [1000, 50],
      [1001, 997],
      [12345, 400],
    ] as const) {
      const pts = sine(n);
      const out = lttb(pts, threshold);
      expect(out.length).toBe(threshold);
      expect(out[0]).toBe(pts[0]);
      expect(out[out.length - 1]).toBe(pts[n - 1]);
      for (let i = 1; i < out.length; i++) expect((out[i] as XY).x).toBeGreaterThan((out[i - 1] as XY).x);
    }
  });

  it('keeps the apex of a small example (computed by hand)', () => {
    // Five points, threshold 3: one middle bucket {1, 2, 3}; with the ends at
    // y = 0 the largest triangle has its apex at the highest point, index 2
    const pts = [
      { x: 0, y: 0 },
      { x: 1, y: 1 },
      { x: 2, y: 5 },
      { x: 3, y: 2 },
      { x: 4, y: 0 },
    ];
    expect(lttb(pts, 3)).toEqual([pts[0], pts[2], pts[4]]);
  });

  it('keeps a single spike in a flat trace', () => {
    const pts = Array.from({ length: 5000 }, (_, i) => ({ x: i, y: i === 3217 ? 40 : 0 }));
    const out = lttb(pts, 60);
    expect(out).toContain(pts[3217]);
  });

  it('keeps a one-sample dip in a noisy depth trace', () => {
    // Depth wobbling ±0.1 m around 1000 m with one 30 m excursion
    const pts = Array.from({ length: 20_000 }, (_, i) => ({
      x: i * 1000,
      y: 1000 + 0.1 * Math.sin(i * 1.7) + (i === 12_345 ? 30 : 0),
    }));
    expect(lttb(pts, 200)).toContain(pts[12_345]);
  });

  it('preserves the extremes of a wave', () => {
    const out = lttb(sine(10_000), 100);
    expect(Math.max(...out.map((p) => p.y))).toBeGreaterThan(0.99);
    expect(Math.min(...out.map((p) => p.y))).toBeLessThan(-0.99);
  });

  it('gives the same choice from parallel arrays', () => {
    const pts = sine(3000);
    const idx = lttbIndices(
      Float64Array.from(pts, (p) => p.x),
      Float64Array.from(pts, (p) => p.y),
      77,
    );
    expect(idx.map((i) => pts[i])).toEqual(lttb(pts, 77));
  });

  it('refuses a threshold below 3 or arrays of different lengths', () => {
    expect(() => lttb(sine(10), 2)).toThrow(RangeError);
    expect(() => lttb(sine(10), 4.5)).toThrow(RangeError);
    expect(() => lttbIndices([1, 2, 3], [1, 2], 3)).toThrow(RangeError);
  });
});
