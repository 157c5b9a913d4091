import { describe, expect, it } from 'vitest';

import { clockMinutes, planIssues, turnsDuring, watchAt, watchChanges, type WatchSpec } from '@/lib/watches';

const w = (name: string, start: string, end: string): WatchSpec => ({ name, start, end, memberIds: [] });
/** Six four-hour watches round the clock (four-hour watches: common practice at sea). */
const sixWatches = [
  w('First', '20:00', '00:00'),
  w('Middle', '00:00', '04:00'),
  w('Morning', '04:00', '08:00'),
  w('Forenoon', '08:00', '12:00'),
  w('Afternoon', '12:00', '16:00'),
  w('Evening', '16:00', '20:00'),
];
const hours = (a: Date, b: Date) => (b.getTime() - a.getTime()) / 3_600_000;
const iso = (s: string) => new Date(s);

describe('which watch is on', () => {
  it('follows the local clock of the display zone across midnight', () => {
    // Lisbon in January is on UTC+0 (IANA tz database, Europe/Lisbon: WET in winter).
    expect(watchAt(sixWatches, 'Europe/Lisbon', iso('2026-01-10T23:59:00.000Z'))?.watch.name).toBe('First');
    expect(watchAt(sixWatches, 'Europe/Lisbon', iso('2026-01-11T00:00:00.000Z'))?.watch.name).toBe('Middle');
    // Auckland in January is on UTC+13 (NZ Daylight Time Order 2007: NZDT until the first Sunday of April).
    const turn = watchAt(sixWatches, 'Pacific/Auckland', iso('2026-01-10T11:30:00.000Z'));
    expect(turn?.watch.name).toBe('Middle'); // 00:30 NZDT on 11 January
    expect(turn?.start.toISOString()).toBe('2026-01-10T11:00:00.000Z');
    expect(turn?.end.toISOString()).toBe('2026-01-10T15:00:00.000Z');
  });

  it('finds a watch that runs past midnight from either side, and none in a gap', () => {
    const plan = [w('Night', '22:00', '02:00'), w('Day', '08:00', '16:00')];
    const before = watchAt(plan, 'UTC', iso('2026-02-01T23:00:00.000Z'));
    const after = watchAt(plan, 'UTC', iso('2026-02-02T01:59:59.999Z'));
    expect(before?.watch.name).toBe('Night');
    expect(after?.start.toISOString()).toBe(before?.start.toISOString());
    expect(after?.end.toISOString()).toBe('2026-02-02T02:00:00.000Z');
    expect(watchAt(plan, 'UTC', iso('2026-02-02T02:00:00.000Z'))).toBeNull();
    expect(watchAt(plan, 'UTC', iso('2026-02-02T07:59:00.000Z'))).toBeNull();
  });
});

describe('changes of watch across a daylight-saving change', () => {
  // EU summer time (Directive 2000/84/EC, art. 2 and 3): clocks go forward at 01:00 UTC on the
  // last Sunday of March and back at 01:00 UTC on the last Sunday of October; in 2026, 29 March
  // and 25 October. Europe/Lisbon moves between UTC+0 and UTC+1 at those instants.
  it('the middle watch lasts 3 real hours the night the clocks go forward (Lisbon)', () => {
    const changes = watchChanges(sixWatches, 'Europe/Lisbon', iso('2026-03-28T21:00:00.000Z'), iso('2026-03-29T09:00:00.000Z'));
    expect(changes.map((c) => [c.at.toISOString(), c.outgoing?.watch.name, c.incoming?.watch.name])).toEqual([
      ['2026-03-29T00:00:00.000Z', 'First', 'Middle'], // 00:00 WET
      ['2026-03-29T03:00:00.000Z', 'Middle', 'Morning'], // 04:00 WEST
      ['2026-03-29T07:00:00.000Z', 'Morning', 'Forenoon'], // 08:00 WEST
    ]);
    const middle = changes[1]!.outgoing!;
    expect(hours(middle.start, middle.end)).toBe(3);
    expect(clockMinutes(middle.watch)).toBe(240);
  });

  it('the middle watch lasts 5 real hours the night the clocks go back (Lisbon)', () => {
    const changes = watchChanges(sixWatches, 'Europe/Lisbon', iso('2026-10-24T21:00:00.000Z'), iso('2026-10-25T09:00:00.000Z'));
    expect(changes.map((c) => c.at.toISOString())).toEqual([
      '2026-10-24T23:00:00.000Z', // 00:00 WEST
      '2026-10-25T04:00:00.000Z', // 04:00 WET
      '2026-10-25T08:00:00.000Z',
    ]);
    expect(hours(changes[0]!.incoming!.start, changes[0]!.incoming!.end)).toBe(5);
  });

  // New Zealand Daylight Time Order 2007: daylight time ends at 03:00 NZDT on the first Sunday of
  // April (2026-04-05, 14:00 UTC on the 4th) and begins at 02:00 NZST on the last Sunday of
  // September (2026-09-27, 14:00 UTC on the 26th).
  it('the Auckland middle watch lasts 5 hours in April and 3 in September', () => {
    const april = watchAt(sixWatches, 'Pacific/Auckland', iso('2026-04-04T13:00:00.000Z'))!;
    expect(april.watch.name).toBe('Middle');
    expect(april.start.toISOString()).toBe('2026-04-04T11:00:00.000Z'); // 00:00 NZDT
    expect(april.end.toISOString()).toBe('2026-04-04T16:00:00.000Z'); // 04:00 NZST
    expect(hours(april.start, april.end)).toBe(5);
    const september = watchAt(sixWatches, 'Pacific/Auckland', iso('2026-09-26T13:00:00.000Z'))!;
    expect(september.start.toISOString()).toBe('2026-09-26T12:00:00.000Z'); // 00:00 NZST
    expect(september.end.toISOString()).toBe('2026-09-26T15:00:00.000Z'); // 04:00 NZDT
    expect(hours(september.start, september.end)).toBe(3);
  });

  it('every day round the clock has six changes, one day 23 hours long and one 25', () => {
    const day = (from: string, to: string) => watchChanges(sixWatches, 'Europe/Lisbon', iso(from), iso(to)).length;
    expect(day('2026-03-28T23:59:00.000Z', '2026-03-29T22:59:00.000Z')).toBe(6);
    expect(day('2026-10-24T22:59:00.000Z', '2026-10-25T23:59:00.000Z')).toBe(6);
  });

  it('a span from a change up to the next includes only the later one', () => {
    const changes = watchChanges(sixWatches, 'UTC', iso('2026-05-01T04:00:00.000Z'), iso('2026-05-01T08:00:00.000Z'));
    expect(changes.map((c) => c.at.toISOString())).toEqual(['2026-05-01T08:00:00.000Z']);
  });

  it('a gap in the plan makes changes to and from no watch', () => {
    const plan = [w('Day', '08:00', '16:00')];
    const changes = watchChanges(plan, 'UTC', iso('2026-05-01T00:00:00.000Z'), iso('2026-05-02T00:00:00.000Z'));
    expect(changes.map((c) => [c.outgoing?.watch.name ?? null, c.incoming?.watch.name ?? null])).toEqual([
      [null, 'Day'],
      ['Day', null],
    ]);
  });
});

describe('turns during a span', () => {
  it('lists the turns that overlap it', () => {
    const turns = turnsDuring(sixWatches, 'UTC', iso('2026-05-01T03:00:00.000Z'), iso('2026-05-01T09:00:00.000Z'));
    expect(turns.map((t) => t.watch.name)).toEqual(['Middle', 'Morning', 'Forenoon']);
  });
});

describe('plan validation', () => {
  it('accepts a full round of watches and a partial cover', () => {
    expect(planIssues(sixWatches)).toEqual([]);
    expect(planIssues([w('Day', '08:00', '16:00'), w('Night', '22:00', '02:00')])).toEqual([]);
    expect(planIssues([])).toEqual([]);
  });

  it('refuses overlaps, including one past midnight', () => {
    expect(planIssues([w('A', '08:00', '12:00'), w('B', '11:00', '13:00')])).toEqual([
      { path: 'watches.1.start', message: 'B overlaps A' },
    ]);
    expect(planIssues([w('Night', '22:00', '02:00'), w('Early', '01:00', '05:00')])).toHaveLength(1);
    expect(planIssues([w('Night', '22:00', '00:00'), w('Early', '00:00', '05:00')])).toEqual([]);
  });

  it('refuses bad times, empty and repeated names, and a watch with no length', () => {
    expect(planIssues([w('A', '8:00', '24:00')]).map((i) => i.path)).toEqual(['watches.0.start', 'watches.0.end']);
    expect(planIssues([w('A', '08:00', '08:00')]).map((i) => i.path)).toEqual(['watches.0.end']);
    expect(planIssues([w(' ', '08:00', '09:00')]).map((i) => i.path)).toEqual(['watches.0.name']);
    expect(planIssues([w('A', '08:00', '09:00'), w('a', '10:00', '11:00')]).map((i) => i.path)).toEqual(['watches.1.name']);
  });
});
