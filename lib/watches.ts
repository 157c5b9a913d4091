/**
 * A campaign's watch plan: named watches with a start and an end in local time of the campaign's
 * display zone, repeating every day, each stood by some of the campaign's members.
 *
 * Times are wall-clock times in the display zone, so a watch follows the ship's clock rather than
 * a fixed number of hours: across a daylight-saving change a four-hour watch such as 00:00–04:00
 * lasts 3 real hours on the night the clocks go forward and 5 on the night they go back. Every
 * instant is worked out from the local date and time through luxon, never by adding hours.
 *
 * A watch whose end is at or before its start runs past midnight (20:00–00:00 ends at midnight,
 * 22:00–02:00 ends on the next day). The plan may leave hours uncovered; watches may not overlap.
 */
import { DateTime } from 'luxon';

export type WatchSpec = {
  name: string;
  /** "HH:mm", local time in the display zone. */
  start: string;
  /** "HH:mm"; at or before `start` means the next day ("00:00" is midnight at the end of the day). */
  end: string;
  memberIds: readonly string[];
};

/** One day's turn of a watch: the real instants it begins and ends. */
export type WatchTurn<W extends WatchSpec = WatchSpec> = { watch: W; start: Date; end: Date };

/** The moment one watch hands over to the next (either may be none where the plan leaves a gap). */
export type WatchChange<W extends WatchSpec = WatchSpec> = {
  at: Date;
  outgoing: WatchTurn<W> | null;
  incoming: WatchTurn<W> | null;
};

export type PlanIssue = { path: string; message: string };

const HHMM = /^([01]\d|2[0-3]):([0-5]\d)$/;
const DAY = 24 * 60;

/** Minutes after local midnight of an "HH:mm" time, or null when it is not one. */
export function minuteOfDay(hhmm: string): number | null {
  const m = HHMM.exec(hhmm);
  return m ? Number(m[1]) * 60 + Number(m[2]) : null;
}

/** The minutes of the day a watch covers, as half-open spans inside [0, 1440). */
function spans(w: WatchSpec): [number, number][] {
  const s = minuteOfDay(w.start)!;
  const e = minuteOfDay(w.end)!;
  return e > s
    ? [[s, e]]
    : e === 0
      ? [[s, DAY]]
      : [
          [s, DAY],
          [0, e],
        ];
}

/** How long a watch lasts by the clock, in minutes (its real length differs on a daylight-saving night). */
export function clockMinutes(w: WatchSpec): number {
  return spans(w).reduce((sum, [a, b]) => sum + b - a, 0);
}

/**
 * What is wrong with a plan: times that are not "HH:mm", a watch that starts and ends at the same
 * time, names missing or used twice, and watches that overlap. Gaps between watches are allowed.
 */
export function planIssues(watches: readonly WatchSpec[]): PlanIssue[] {
  const issues: PlanIssue[] = [];
  const names = new Map<string, number>();
  watches.forEach((w, i) => {
    const name = w.name.trim().toLowerCase();
    if (!name) issues.push({ path: `watches.${i}.name`, message: 'Give the watch a name' });
    else if (names.has(name)) issues.push({ path: `watches.${i}.name`, message: `Another watch is already called ${w.name.trim()}` });
    else names.set(name, i);
    const s = minuteOfDay(w.start);
    const e = minuteOfDay(w.end);
    if (s === null) issues.push({ path: `watches.${i}.start`, message: 'Use a 24-hour time such as 08:00' });
    if (e === null) issues.push({ path: `watches.${i}.end`, message: 'Use a 24-hour time such as 12:00' });
    if (s !== null && s === e) issues.push({ path: `watches.${i}.end`, message: 'A watch must end at another time than it starts' });
  });
  if (issues.length > 0) return issues;
  for (let i = 0; i < watches.length; i++) {
    for (let j = 0; j < i; j++) {
      const clash = spans(watches[i]!).some(([a, b]) => spans(watches[j]!).some(([c, d]) => a < d && c < b));
      if (clash) issues.push({ path: `watches.${i}.start`, message: `${watches[i]!.name.trim()} overlaps ${watches[j]!.name.trim()}` });
    }
  }
  return issues;
}

/**
 * The real instant of a local date and time in a zone. A time the clocks skip (inside the hour lost
 * when they go forward) moves forward by the gap, which luxon does; the watch then begins at the
 * first instant the clock shows a time at or after its start.
 */
function instantOf(day: DateTime, minute: number): Date {
  return day
    .startOf('day')
    .set({ hour: Math.floor(minute / 60), minute: minute % 60 })
    .toJSDate();
}

/** The turns of every watch that begin on the local dates from `first` to `last`, in time order. */
function turnsOn<W extends WatchSpec>(watches: readonly W[], zone: string, first: DateTime, last: DateTime): WatchTurn<W>[] {
  const turns: WatchTurn<W>[] = [];
  for (let day = first.startOf('day'); day <= last; day = day.plus({ days: 1 })) {
    for (const w of watches) {
      const s = minuteOfDay(w.start)!;
      const e = minuteOfDay(w.end)!;
      const endDay = e > s ? day : day.plus({ days: 1 });
      turns.push({ watch: w, start: instantOf(day, s), end: instantOf(endDay, e) });
    }
  }
  return turns.sort((a, b) => a.start.getTime() - b.start.getTime());
}

const localDay = (at: Date, zone: string) => DateTime.fromJSDate(at, { zone }).startOf('day');

/** The watch on at an instant (its turn, with the real instants it began and ends), or null in a gap. */
export function watchAt<W extends WatchSpec>(watches: readonly W[], zone: string, at: Date): WatchTurn<W> | null {
  const day = localDay(at, zone);
  const t = at.getTime();
  return turnsOn(watches, zone, day.minus({ days: 1 }), day).find((turn) => turn.start.getTime() <= t && t < turn.end.getTime()) ?? null;
}

/**
 * Every change of watch after `from` and up to and including `to`, in time order. A change is an
 * instant where one turn ends or another begins; back-to-back watches make one change, not two.
 */
export function watchChanges<W extends WatchSpec>(watches: readonly W[], zone: string, from: Date, to: Date): WatchChange<W>[] {
  if (watches.length === 0 || to.getTime() <= from.getTime()) return [];
  const turns = turnsOn(watches, zone, localDay(from, zone).minus({ days: 1 }), localDay(to, zone).plus({ days: 1 }));
  const instants = new Set<number>();
  for (const turn of turns) {
    for (const at of [turn.start.getTime(), turn.end.getTime()]) {
      if (at > from.getTime() && at <= to.getTime()) instants.add(at);
    }
  }
  const on = (t: number) => turns.find((turn) => turn.start.getTime() <= t && t < turn.end.getTime()) ?? null;
  return [...instants]
    .sort((a, b) => a - b)
    .map((at) => ({ at: new Date(at), outgoing: on(at - 1), incoming: on(at) }))
    .filter((c) => c.outgoing?.watch !== c.incoming?.watch || c.outgoing?.start.getTime() !== c.incoming?.start.getTime());
}

/** Every turn that overlaps the span [from, to), in time order. */
export function turnsDuring<W extends WatchSpec>(watches: readonly W[], zone: string, from: Date, to: Date): WatchTurn<W>[] {
  if (watches.length === 0 || to.getTime() <= from.getTime()) return [];
  return turnsOn(watches, zone, localDay(from, zone).minus({ days: 1 }), localDay(to, zone)).filter(
    (turn) => turn.start.getTime() < to.getTime() && turn.end.getTime() > from.getTime(),
  );
}
