import { describe, expect, it } from 'vitest';

import { diveWindow, isOtherDay, isOutsideDive, isUnderWay } from '@/lib/dive-window';

// The window's margins are the product's rule (common practice at sea: an hour either side of the
// dive for the deck's own entries, a day either side of a planned start), not a published value.
const phases = (launch: string | null, onDeck: string | null = null) => ({ launch, onBottom: null, offBottom: null, onDeck });

describe('the window of a dive', () => {
  const finished = { phases: phases('2026-05-14T18:20:00.000Z', '2026-05-14T23:45:00.000Z'), plannedStartAt: null };

  it('runs from an hour before launch to an hour after on deck', () => {
    expect(diveWindow(finished)).toEqual({ from: Date.parse('2026-05-14T17:20:00.000Z'), to: Date.parse('2026-05-15T00:45:00.000Z') });
    expect(isOutsideDive(finished, '2026-05-14T17:20:00.000Z')).toBe(false);
    expect(isOutsideDive(finished, '2026-05-14T17:19:59.999Z')).toBe(true);
    expect(isOutsideDive(finished, '2026-05-15T00:45:00.000Z')).toBe(false);
    expect(isOutsideDive(finished, '2026-12-02T10:00:00.000Z')).toBe(true);
  });

  it('has no end while the dive is under way', () => {
    const underWay = { phases: phases('2026-05-14T18:20:00.000Z'), plannedStartAt: null };
    expect(isOutsideDive(underWay, '2027-01-01T00:00:00.000Z')).toBe(false);
    expect(isUnderWay(underWay, Date.parse('2026-05-14T19:00:00.000Z'))).toBe(true);
    expect(isUnderWay(finished, Date.parse('2026-05-14T19:00:00.000Z'))).toBe(false);
  });

  it('is a day either side of the planned start before launch, and absent with no plan', () => {
    const planned = { phases: phases(null), plannedStartAt: '2026-06-02T18:30:00.000Z' };
    expect(isOutsideDive(planned, '2026-06-01T18:30:00.000Z')).toBe(false);
    expect(isOutsideDive(planned, '2026-06-03T18:30:00.001Z')).toBe(true);
    expect(isOutsideDive({ phases: phases(null), plannedStartAt: null }, '2020-01-01T00:00:00.000Z')).toBe(false);
  });

  it('tells an entry on another UTC day than the launch', () => {
    expect(isOtherDay(finished, '2026-05-14T23:59:59.000Z')).toBe(false);
    expect(isOtherDay(finished, '2026-05-15T00:10:00.000Z')).toBe(true);
  });
});
