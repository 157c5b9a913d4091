/**
 * Axis arithmetic for the dive's plots: linear scales, round tick values, and tick times on
 * whole UTC seconds, minutes or hours.
 */

/** Maps a domain linearly onto a range (a zero-width domain maps to the range's start). */
export function linearScale(d0: number, d1: number, r0: number, r1: number): (v: number) => number {
  const k = d1 === d0 ? 0 : (r1 - r0) / (d1 - d0);
  return (v) => r0 + (v - d0) * k;
}

/** A step of 1, 2 or 5 times a power of ten that cuts `span` into about `target` parts. */
export function niceStep(span: number, target: number): number {
  if (!(span > 0) || !(target > 0)) return 1;
  const raw = span / target;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const f = raw / magnitude;
  return (f <= 1.5 ? 1 : f <= 3.5 ? 2 : f <= 7.5 ? 5 : 10) * magnitude;
}

/** Multiples of `step` from `min` to `max` inclusive, free of floating-point crumbs. */
export function ticksOf(min: number, max: number, step: number): number[] {
  const out: number[] = [];
  const decimals = Math.max(0, -Math.floor(Math.log10(step)) + 1);
  for (let i = Math.ceil(min / step - 1e-9); i * step <= max + step * 1e-9; i++) out.push(Number((i * step).toFixed(decimals)));
  return out;
}

/** Round ticks across [min, max], about `target` of them. */
export function ticks(min: number, max: number, target: number): number[] {
  return ticksOf(min, max, niceStep(max - min, target));
}

/** The smallest multiple of a round step at or above `value` (at least `floor`): a clean axis end. */
export function niceCeil(value: number, floor = 10): number {
  const v = Math.max(value, floor);
  const step = niceStep(v, 5);
  return Math.ceil(v / step - 1e-9) * step;
}

const SECOND = 1000;
const MINUTE = 60 * SECOND;
const HOUR = 60 * MINUTE;
const TIME_STEPS = [
  SECOND,
  2 * SECOND,
  5 * SECOND,
  10 * SECOND,
  15 * SECOND,
  30 * SECOND,
  MINUTE,
  2 * MINUTE,
  5 * MINUTE,
  10 * MINUTE,
  15 * MINUTE,
  30 * MINUTE,
  HOUR,
  2 * HOUR,
  3 * HOUR,
  6 * HOUR,
  12 * HOUR,
  24 * HOUR,
];

/**
 * Tick instants across [fromMs, toMs], at most about `target` of them, on whole UTC steps (every
 * step divides a day, and the epoch is a UTC midnight, so multiples of it fall on round clock times).
 */
export function timeTicks(fromMs: number, toMs: number, target: number): { step: number; ticks: number[] } {
  const span = toMs - fromMs;
  const step = TIME_STEPS.find((s) => span / s <= target) ?? TIME_STEPS[TIME_STEPS.length - 1]!;
  const out: number[] = [];
  for (let t = Math.ceil(fromMs / step) * step; t <= toMs; t += step) out.push(t);
  return { step, ticks: out };
}

/** A tick time as the clock shows it in UTC: "21:14" or, for steps under a minute, "21:14:30". */
export function formatTickTime(ms: number, step: number): string {
  const iso = new Date(ms).toISOString();
  return step < MINUTE ? iso.slice(11, 19) : iso.slice(11, 16);
}

/**
 * An SVG path through points in time order that lifts the pen across each gap of the log (a
 * stretch with no sample), so a line never bridges a time with no telemetry.
 */
export function pathAcrossGaps(points: { t: number; x: number; y: number }[], gaps: { from: number; to: number }[]): string {
  let d = '';
  let gi = 0;
  let prevT = Number.NEGATIVE_INFINITY;
  for (const p of points) {
    while (gi < gaps.length && gaps[gi]!.to <= prevT) gi++;
    const acrossGap = gi < gaps.length && gaps[gi]!.from >= prevT && gaps[gi]!.to <= p.t;
    d += `${d === '' || acrossGap ? 'M' : 'L'}${p.x.toFixed(1)} ${p.y.toFixed(1)}`;
    prevT = p.t;
  }
  return d;
}

/**
 * A touch-target size for each marker: as big as `max`, but never so big that it covers a
 * neighbour's centre, so every marker stays reachable however close the entries are (down to
 * `min`). Neighbours are searched in x order, so a dive with thousands of entries stays cheap.
 */
export function targetSizes(points: { x: number; y: number }[], max: number, min: number): number[] {
  const order = points.map((_, i) => i).sort((a, b) => points[a]!.x - points[b]!.x);
  const sizes = points.map(() => max);
  for (let k = 0; k < order.length; k++) {
    const i = order[k]!;
    const p = points[i]!;
    for (let m = k + 1; m < order.length; m++) {
      const j = order[m]!;
      const q = points[j]!;
      if (q.x - p.x >= max) break;
      const d = Math.max(min, Math.hypot(q.x - p.x, q.y - p.y));
      if (d < sizes[i]!) sizes[i] = d;
      if (d < sizes[j]!) sizes[j] = d;
    }
  }
  return sizes;
}

/** The part of segment a→b inside the rectangle (Liang–Barsky), as fractions [t0, t1] along it; null when none is. */
function clipSegment(
  a: { x: number; y: number },
  b: { x: number; y: number },
  r: { x: number; y: number; width: number; height: number },
): [number, number] | null {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  let t0 = 0;
  let t1 = 1;
  const edges: [number, number][] = [
    [-dx, a.x - r.x],
    [dx, r.x + r.width - a.x],
    [-dy, a.y - r.y],
    [dy, r.y + r.height - a.y],
  ];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return null;
      continue;
    }
    const t = q / p;
    if (p < 0) {
      if (t > t1) return null;
      if (t > t0) t0 = t;
    } else {
      if (t < t0) return null;
      if (t < t1) t1 = t;
    }
  }
  return [t0, t1];
}

/**
 * Like `pathAcrossGaps`, but cut at a rectangle: only what lies inside it is drawn, so a track that
 * runs off the plot never crosses the frame or the axis labels.
 */
export function pathInFrame(
  points: { t: number; x: number; y: number }[],
  gaps: { from: number; to: number }[],
  frame: { x: number; y: number; width: number; height: number },
): string {
  let d = '';
  let gi = 0;
  let penAt: { x: number; y: number } | null = null;
  const at = (a: { x: number; y: number }, b: { x: number; y: number }, t: number) => ({
    x: a.x + (b.x - a.x) * t,
    y: a.y + (b.y - a.y) * t,
  });
  const fmt = (p: { x: number; y: number }) => `${p.x.toFixed(1)} ${p.y.toFixed(1)}`;
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1]!;
    const b = points[i]!;
    while (gi < gaps.length && gaps[gi]!.to <= a.t) gi++;
    if (gi < gaps.length && gaps[gi]!.from >= a.t && gaps[gi]!.to <= b.t) {
      penAt = null;
      continue;
    }
    const cut = clipSegment(a, b, frame);
    if (!cut) {
      penAt = null;
      continue;
    }
    const from = at(a, b, cut[0]);
    const to = at(a, b, cut[1]);
    if (!penAt || Math.abs(penAt.x - from.x) > 0.01 || Math.abs(penAt.y - from.y) > 0.01) d += `M${fmt(from)}`;
    d += `L${fmt(to)}`;
    penAt = cut[1] < 1 ? null : to;
  }
  return d;
}
