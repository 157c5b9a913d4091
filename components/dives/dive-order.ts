/**
 * The campaign's dives in the order a person at sea looks for them, and the number the next dive
 * is likely to get. Pure, so both are tested without a screen.
 */
import type { Dive } from '@/lib/schemas';

/** When a dive happened or is to happen, for ordering: its launch, else its planned start, else when it was planned. */
const when = (d: Dive) => d.phases.launch ?? d.plannedStartAt ?? d.createdAt;

const newestFirst = (a: Dive, b: Dive) => (when(a) < when(b) ? 1 : when(a) > when(b) ? -1 : a.number < b.number ? 1 : -1);

/** The dive that matters now: one under way (launched, not yet on deck), else the next planned, else the latest. */
export function currentDive(dives: readonly Dive[]): Dive | undefined {
  const underWay = dives.filter((d) => d.phases.launch && !d.phases.onDeck).sort(newestFirst)[0];
  if (underWay) return underWay;
  const planned = dives.filter((d) => !d.phases.launch).sort((a, b) => -newestFirst(a, b))[0];
  return planned ?? [...dives].sort(newestFirst)[0];
}

/** The current dive first, then the rest newest first. */
export function orderDives(dives: readonly Dive[]): Dive[] {
  const current = currentDive(dives);
  const rest = dives.filter((d) => d !== current).sort(newestFirst);
  return current ? [current, ...rest] : rest;
}

/**
 * The number after the campaign's latest in its own pattern, keeping the width of its digits
 * ("VS-04" → "VS-05", "VS-09" → "VS-10", "D7" → "D8"); empty when no dive ends in a number.
 */
export function nextDiveNumber(dives: readonly Pick<Dive, 'number' | 'createdAt'>[]): string {
  const numbered = dives
    .map((d) => ({ d, m: /^(.*?)(\d+)$/.exec(d.number) }))
    .filter((x): x is { d: (typeof dives)[number]; m: RegExpExecArray } => x.m !== null);
  if (numbered.length === 0) return '';
  // The pattern of the dive planned last; within it, the highest number so far.
  const latest = numbered.reduce((a, b) => (b.d.createdAt > a.d.createdAt ? b : a));
  const prefix = latest.m[1]!;
  const highest = numbered.filter((x) => x.m[1] === prefix).reduce((a, b) => (Number(b.m[2]) > Number(a.m[2]) ? b : a));
  const digits = highest.m[2]!;
  return prefix + String(Number(digits) + 1).padStart(digits.length, '0');
}
