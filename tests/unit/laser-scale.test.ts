import { describe, expect, it } from 'vitest';

import { formatMeasurement, measure, MeasureError, polygonAreaPx, polylineLengthPx, type Point } from '../../lib/laser-scale';

// Every expected value here is worked here by hand (Pythagoras, the shoelace formula and
// first-order error propagation written out on paper); no published source is claimed.
// Laser dots 100 px apart with 10 cm spacing give 0.1 cm per pixel in most cases below.
const dots: [Point, Point] = [
  [100, 100],
  [200, 100],
];

describe('scale from the laser dots', () => {
  it('is the spacing over the dots’ pixel distance', () => {
    const m = measure({
      spacingCm: 10,
      laser: dots,
      kind: 'length',
      points: [
        [0, 0],
        [10, 0],
      ],
    });
    expect(m.laserDistancePx).toBe(100); // worked here: 200 − 100
    expect(m.scaleCmPerPx).toBeCloseTo(0.1, 12); // worked here: 10 cm / 100 px
  });

  it('uses the straight-line distance between dots that are not level', () => {
    const m = measure({
      spacingCm: 10,
      laser: [
        [0, 0],
        [30, 40],
      ],
      kind: 'length',
      points: [
        [0, 0],
        [50, 0],
      ],
    });
    expect(m.laserDistancePx).toBe(50); // worked here: the 3-4-5 triangle, √(30² + 40²)
    expect(m.scaleCmPerPx).toBeCloseTo(0.2, 12); // worked here: 10 cm / 50 px
    expect(m.value).toBeCloseTo(10, 12); // worked here: 50 px · 0.2 cm/px
  });
});

describe('length', () => {
  it('of a straight bar, with its uncertainty at ±2 px', () => {
    const m = measure({
      spacingCm: 10,
      laser: dots,
      kind: 'length',
      points: [
        [50, 300],
        [350, 300],
      ],
    });
    expect(m.unit).toBe('cm');
    expect(m.value).toBeCloseTo(30, 12); // worked here: 300 px · 0.1 cm/px
    // Worked here: each end and each dot moves its distance by ±2 along the line, so
    // δL = δd = 2√2 px; δV/V = √((2√2/300)² + (2√2/100)²) = 4√5/300, δV = 30 · 4√5/300 = 0.4√5.
    expect(m.uncertainty).toBeCloseTo(0.4 * Math.sqrt(5), 9);
    expect(m.uncertainty).toBeCloseTo(0.894427, 5);
  });

  it('shrinks the uncertainty in proportion to a finer placement', () => {
    const m = measure({
      spacingCm: 10,
      laser: dots,
      kind: 'length',
      points: [
        [50, 300],
        [350, 300],
      ],
      placementPx: 0.5,
    });
    expect(m.value).toBeCloseTo(30, 12);
    expect(m.uncertainty).toBeCloseTo(0.223607, 5); // worked here: 0.4√5 · 0.5/2
  });

  it('of a bent polyline sums its segments and counts the bend', () => {
    const m = measure({
      spacingCm: 10,
      laser: dots,
      kind: 'length',
      points: [
        [0, 0],
        [30, 0],
        [30, 40],
      ],
    });
    expect(
      polylineLengthPx([
        [0, 0],
        [30, 0],
        [30, 40],
      ]),
    ).toBe(70); // worked here: 30 + 40
    expect(m.value).toBeCloseTo(7, 12); // worked here: 70 px · 0.1
    // Worked here: squared gradients 1 (first end), |(1,0) − (0,1)|² = 2 (the corner), 1 (last end):
    // δV² = 0.1² · 4 · 2² + (7/100)² · 2 · 2² = 0.16 + 0.0392 = 0.1992.
    expect(m.uncertainty).toBeCloseTo(Math.sqrt(0.1992), 9);
    expect(m.uncertainty).toBeCloseTo(0.446318, 5);
  });
});

describe('area', () => {
  const square: Point[] = [
    [0, 0],
    [100, 0],
    [100, 100],
    [0, 100],
  ];

  it('of a square by the shoelace formula, with its uncertainty', () => {
    const m = measure({ spacingCm: 10, laser: dots, kind: 'area', points: square });
    expect(m.unit).toBe('cm²');
    expect(polygonAreaPx(square)).toBe(10000); // worked here: 100 · 100
    expect(m.value).toBeCloseTo(100, 10); // worked here: 10000 px² · 0.01 cm²/px²
    // Worked here: each corner's area gradient is (±50, ±50), squared norm 5000, four corners 20000;
    // δV² = 0.1⁴ · 20000 · 4 + (2 · 100/100)² · 2 · 4 = 8 + 32 = 40, δV = 2√10.
    expect(m.uncertainty).toBeCloseTo(2 * Math.sqrt(10), 9);
    expect(m.uncertainty).toBeCloseTo(6.324555, 5);
  });

  it('does not depend on the direction the polygon is drawn in', () => {
    const a = measure({ spacingCm: 10, laser: dots, kind: 'area', points: square });
    const b = measure({ spacingCm: 10, laser: dots, kind: 'area', points: [...square].reverse() });
    expect(b.value).toBeCloseTo(a.value, 12);
    expect(b.uncertainty).toBeCloseTo(a.uncertainty, 12);
  });

  it('of a right triangle is half the rectangle', () => {
    const m = measure({
      spacingCm: 10,
      laser: dots,
      kind: 'area',
      points: [
        [0, 0],
        [100, 0],
        [0, 100],
      ],
    });
    expect(m.value).toBeCloseTo(50, 10); // worked here: ½ · 100 · 100 px² · 0.01
  });
});

describe('refusals', () => {
  const refused = (input: Parameters<typeof measure>[0]) => {
    try {
      measure(input);
    } catch (err) {
      expect(err).toBeInstanceOf(MeasureError);
      return (err as MeasureError).path;
    }
    return 'accepted';
  };

  it('refuses laser dots on one pixel or closer than 10 px (6, 7.9 is 9.92 px away)', () => {
    expect(
      refused({
        spacingCm: 10,
        laser: [
          [5, 5],
          [5, 5],
        ],
        kind: 'length',
        points: [
          [0, 0],
          [9, 9],
        ],
      }),
    ).toBe('laser');
    expect(
      refused({
        spacingCm: 10,
        laser: [
          [0, 0],
          [6, 7.9],
        ],
        kind: 'length',
        points: [
          [0, 0],
          [9, 9],
        ],
      }),
    ).toBe('laser');
    expect(
      refused({
        spacingCm: 10,
        laser: [
          [0, 0],
          [10, 0],
        ],
        kind: 'length',
        points: [
          [0, 0],
          [9, 9],
        ],
      }),
    ).toBe('accepted');
  });

  it('refuses points outside the photo', () => {
    const image = { width: 400, height: 300 };
    expect(
      refused({
        spacingCm: 10,
        laser: dots,
        kind: 'length',
        points: [
          [0, 0],
          [401, 10],
        ],
        image,
      }),
    ).toBe('points.1');
    expect(
      refused({
        spacingCm: 10,
        laser: [
          [-1, 0],
          [200, 0],
        ],
        kind: 'length',
        points: [
          [0, 0],
          [40, 10],
        ],
        image,
      }),
    ).toBe('laser.0');
    expect(
      refused({
        spacingCm: 10,
        laser: dots,
        kind: 'length',
        points: [
          [0, 0],
          [400, 300],
        ],
        image,
      }),
    ).toBe('accepted');
  });

  it('refuses too few points, a zero length and a flat polygon', () => {
    expect(refused({ spacingCm: 10, laser: dots, kind: 'length', points: [[0, 0]] })).toBe('points');
    expect(
      refused({
        spacingCm: 10,
        laser: dots,
        kind: 'length',
        points: [
          [3, 3],
          [3, 3],
        ],
      }),
    ).toBe('points');
    expect(
      refused({
        spacingCm: 10,
        laser: dots,
        kind: 'area',
        points: [
          [0, 0],
          [10, 0],
        ],
      }),
    ).toBe('points');
    expect(
      refused({
        spacingCm: 10,
        laser: dots,
        kind: 'area',
        points: [
          [0, 0],
          [10, 0],
          [20, 0],
        ],
      }),
    ).toBe('points');
  });

  it('refuses a spacing or placement of zero', () => {
    expect(
      refused({
        spacingCm: 0,
        laser: dots,
        kind: 'length',
        points: [
          [0, 0],
          [9, 9],
        ],
      }),
    ).toBe('spacingCm');
    expect(
      refused({
        spacingCm: 10,
        laser: dots,
        kind: 'length',
        points: [
          [0, 0],
          [9, 9],
        ],
        placementPx: 0,
      }),
    ).toBe('placementPx');
  });
});

describe('formatMeasurement', () => {
  it('rounds the value to the uncertainty’s first figure', () => {
    expect(formatMeasurement({ value: 30, uncertainty: 0.894427, unit: 'cm' })).toBe('30.0 ± 0.9 cm');
    expect(formatMeasurement({ value: 100, uncertainty: 6.3246, unit: 'cm²' })).toBe('100 ± 6 cm²');
    expect(formatMeasurement({ value: 7.0123, uncertainty: 0.15, unit: 'cm' })).toBe('7.01 ± 0.15 cm');
    expect(formatMeasurement({ value: 1234.5, uncertainty: 23, unit: 'cm²' })).toBe('1235 ± 23 cm²');
    expect(formatMeasurement({ value: 7, uncertainty: 0, unit: 'cm' })).toBe('7.0 cm');
  });
});
