/**
 * When an entry of a dive may be expected: from an hour before launch to an hour after the
 * vehicle is on deck (a dive under way has no end yet), or a day either side of the planned start
 * for a dive not yet launched. An entry outside it is still taken (logging from the video after the
 * dive is real work) but is marked, so a wrong date or a clock in local time shows.
 */
import type { Dive } from './schemas';

const HOUR_MS = 3_600_000;
const DAY_MS = 24 * HOUR_MS;

export type DiveWindow = { from: number; to: number | null };

type Timing = Pick<Dive, 'phases' | 'plannedStartAt'>;

/** The dive's window in milliseconds since the epoch; null when the dive is neither launched nor planned for a time. */
export function diveWindow(dive: Timing): DiveWindow | null {
  const { launch, onDeck } = dive.phases;
  if (launch) return { from: Date.parse(launch) - HOUR_MS, to: onDeck ? Date.parse(onDeck) + HOUR_MS : null };
  if (dive.plannedStartAt) {
    const planned = Date.parse(dive.plannedStartAt);
    return { from: planned - DAY_MS, to: planned + DAY_MS };
  }
  return null;
}

/** Whether an instant lies outside the dive's window (never, for a dive with no window). */
export function isOutsideDive(dive: Timing, at: string): boolean {
  const w = diveWindow(dive);
  const t = Date.parse(at);
  if (!w || Number.isNaN(t)) return false;
  return t < w.from || (w.to !== null && t > w.to);
}

/** Whether the dive is under way at `now`: launched and not yet on deck. */
export function isUnderWay(dive: Pick<Dive, 'phases'>, now: number): boolean {
  const { launch, onDeck } = dive.phases;
  return !!launch && Date.parse(launch) <= now && !onDeck;
}

/** Whether an instant falls on another UTC day than the dive's launch (or its planned start). */
export function isOtherDay(dive: Timing, at: string): boolean {
  const day = dive.phases.launch ?? dive.plannedStartAt;
  return !!day && day.slice(0, 10) !== new Date(at).toISOString().slice(0, 10);
}
