import { describe, expect, it } from 'vitest';

import { justifiedRows } from '@/components/photos/justified-rows';

const photos = (aspects: number[]) => aspects.map((a, i) => ({ id: `p${i}`, a }));
const rowsOf = (aspects: number[], width = 1000) =>
  justifiedRows(
    photos(aspects),
    (p) => p.a,
    (p) => p.id,
    { width, targetHeight: 200, gap: 10 },
  );

describe('a justified grid of photos', () => {
  it('keeps each photo’s aspect ratio and fills every full row to the width exactly', () => {
    const rows = rowsOf([16 / 9, 4 / 3, 1, 16 / 9, 3 / 4, 16 / 9, 4 / 3]);
    for (const row of rows.slice(0, -1)) {
      const used = row.tiles.reduce((sum, t) => sum + t.width, 0) + 10 * (row.tiles.length - 1);
      expect(used).toBeCloseTo(1000, 6);
    }
    for (const row of rows) for (const t of row.tiles) expect(t.width / t.height).toBeCloseTo(Math.min(3, Math.max(0.5, t.item.a)), 9);
    expect(rows.flatMap((r) => r.tiles.map((t) => t.item.id))).toEqual(['p0', 'p1', 'p2', 'p3', 'p4', 'p5', 'p6']);
  });

  it('does not blow up a short last row beyond the target height', () => {
    const rows = rowsOf([16 / 9]);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.height).toBe(200);
    expect(rows[0]!.tiles[0]!.width).toBeCloseTo(355.56, 2);
  });

  it('clamps a panorama so that it cannot take a whole row at a sliver of height', () => {
    const [row] = rowsOf([20], 400);
    expect(row!.tiles[0]!.width / row!.tiles[0]!.height).toBe(3);
    expect(rowsOf([1, 1], 0)).toEqual([]);
  });
});
