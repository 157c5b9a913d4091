import { describe, expect, it } from 'vitest';

import { emptiestCorner, overlaps, placeLabels } from '@/components/telemetry/label-placement';
import { pathInFrame } from '@/components/telemetry/plot-scale';

const frame = { x: 0, y: 0, width: 100, height: 100 };

/** Every coordinate pair of an SVG path made of M and L commands. */
const coords = (d: string) => [...d.matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]) }));

describe('a track cut at the plot frame', () => {
  it('keeps every drawn point inside the frame and cuts a crossing segment at the edge', () => {
    const d = pathInFrame(
      [
        { t: 0, x: 50, y: 50 },
        { t: 1, x: 150, y: 50 },
        { t: 2, x: 150, y: 80 },
        { t: 3, x: 50, y: 80 },
      ],
      [],
      frame,
    );
    expect(d).toBe('M50.0 50.0L100.0 50.0M100.0 80.0L50.0 80.0');
    for (const p of coords(d)) {
      expect(p.x).toBeGreaterThanOrEqual(0);
      expect(p.x).toBeLessThanOrEqual(100);
    }
  });

  it('draws nothing across a gap of the log or for a segment wholly outside', () => {
    const pts = [
      { t: 0, x: 10, y: 10 },
      { t: 10, x: 20, y: 10 },
      { t: 20, x: 30, y: 10 },
    ];
    expect(pathInFrame(pts, [{ from: 10, to: 20 }], frame)).toBe('M10.0 10.0L20.0 10.0');
    expect(
      pathInFrame(
        [
          { t: 0, x: -10, y: -10 },
          { t: 1, x: -20, y: 200 },
        ],
        [],
        frame,
      ),
    ).toBe('');
  });
});

describe('labels on a plot', () => {
  it('never overlap each other, the obstacles or the frame’s edge', () => {
    const obstacles = [{ x: 40, y: 40, width: 14, height: 14 }];
    const labels = placeLabels(
      [
        { key: 'a', text: 'Datum', x: 47, y: 47 },
        { key: 'b', text: 'F-001', x: 47, y: 47 },
        { key: 'c', text: 'F-002', x: 49, y: 47 },
      ],
      obstacles,
      frame,
    );
    expect(labels.length).toBeGreaterThanOrEqual(2);
    for (const l of labels) {
      expect(obstacles.some((o) => overlaps(o, l.box))).toBe(false);
      expect(l.box.x).toBeGreaterThanOrEqual(0);
      expect(l.box.x + l.box.width).toBeLessThanOrEqual(100);
      for (const m of labels) if (m !== l) expect(overlaps(l.box, m.box)).toBe(false);
    }
  });

  it('puts the north arrow in the corner with the fewest points', () => {
    const crowdedTopRight = Array.from({ length: 5 }, (_, i) => ({ x: 90 - i, y: 5 + i }));
    const box = emptiestCorner(frame, { width: 20, height: 40 }, crowdedTopRight, 4);
    expect(box).toEqual({ x: 4, y: 4, width: 20, height: 40 });
  });
});
