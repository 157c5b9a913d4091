import { describe, expect, it } from 'vitest';

import { withPhases } from '@/components/dives/log-rows';
import type { Observation } from '@/lib/schemas';

describe('dive phases in the log', () => {
  const entry = (id: string, observedAt: string) => ({ id, observedAt }) as Observation;
  const phases = {
    launch: '2026-05-13T20:00:00.000Z',
    onBottom: '2026-05-13T20:40:00.000Z',
    offBottom: '2026-05-13T23:00:00.000Z',
    onDeck: null,
  };
  const items = [entry('c', '2026-05-13T22:00:00.000Z'), entry('b', '2026-05-13T21:00:00.000Z'), entry('a', '2026-05-13T20:45:00.000Z')];
  const keys = (rows: ReturnType<typeof withPhases>) => rows.map((r) => r.key);

  it('sit between the entries at their times, newest first', () => {
    expect(keys(withPhases(items, phases, 'desc', true))).toEqual(['phase-offBottom', 'c', 'b', 'a', 'phase-onBottom', 'phase-launch']);
  });

  it('follow the order of the log when it runs oldest first', () => {
    expect(keys(withPhases([...items].reverse(), phases, 'asc', true))).toEqual([
      'phase-launch',
      'phase-onBottom',
      'a',
      'b',
      'c',
      'phase-offBottom',
    ]);
  });

  it('wait for older pages before showing a phase older than every loaded entry', () => {
    expect(keys(withPhases(items, phases, 'desc', false))).toEqual(['phase-offBottom', 'c', 'b', 'a']);
  });

  it('are left out when there are no phases, or no entries to put them between', () => {
    expect(keys(withPhases(items, undefined, 'desc', true))).toEqual(['c', 'b', 'a']);
    expect(keys(withPhases([], phases, 'desc', true))).toEqual([]);
  });
});
