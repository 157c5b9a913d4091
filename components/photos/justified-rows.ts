/**
 * A justified grid: photos in reading order, packed into rows that each fill the width at one
 * height, so every photo keeps its own aspect ratio (a 16:9 frame grab keeps its burnt-in time and
 * depth) and the rows line up on both edges. The last row, if short, keeps the target height
 * rather than being blown up.
 */
export type JustifiedTile<T> = { item: T; width: number; height: number };
export type JustifiedRow<T> = { key: string; height: number; tiles: JustifiedTile<T>[] };

/** Aspect ratios beyond these are clamped, so a panorama or a sliver cannot take a whole row. */
const MIN_ASPECT = 0.5;
const MAX_ASPECT = 3;

export function justifiedRows<T>(
  items: readonly T[],
  aspectOf: (item: T) => number,
  keyOf: (item: T) => string,
  { width, targetHeight, gap }: { width: number; targetHeight: number; gap: number },
): JustifiedRow<T>[] {
  const rows: JustifiedRow<T>[] = [];
  if (width <= 0) return rows;
  let pending: { item: T; aspect: number }[] = [];
  let aspectSum = 0;
  const flush = (last: boolean) => {
    if (pending.length === 0) return;
    const free = width - gap * (pending.length - 1);
    const fitted = free / aspectSum;
    const height = last ? Math.min(targetHeight, fitted) : fitted;
    rows.push({
      key: keyOf(pending[0]!.item),
      height,
      tiles: pending.map((p) => ({ item: p.item, width: p.aspect * height, height })),
    });
    pending = [];
    aspectSum = 0;
  };
  for (const item of items) {
    const raw = aspectOf(item);
    const aspect = Number.isFinite(raw) && raw > 0 ? Math.min(MAX_ASPECT, Math.max(MIN_ASPECT, raw)) : 1;
    pending.push({ item, aspect });
    aspectSum += aspect;
    // The row is full once its photos at the target height reach the width.
    if (aspectSum * targetHeight + gap * (pending.length - 1) >= width) flush(false);
  }
  flush(true);
  return rows;
}
