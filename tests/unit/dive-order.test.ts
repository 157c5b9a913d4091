import { describe, expect, it } from 'vitest';

import { currentDive, nextDiveNumber, orderDives } from '@/components/dives/dive-order';
import type { Dive } from '@/lib/schemas';

const dive = (number: string, patch: Partial<Dive> & { launch?: string; onDeck?: string } = {}): Dive => {
  const { launch = null, onDeck = null, ...rest } = patch;
  return {
    id: number,
    campaignId: 'c',
    number,
    objectives: '',
    plannedMaxDepth: null,
    plannedStartAt: null,
    phases: { launch, onBottom: null, offBottom: null, onDeck },
    recording: { startAt: null, frameRate: null },
    telemetryGapS: 30,
    laserSpacingCm: null,
    observationCount: 0,
    version: 1,
    createdAt: '2026-05-01T00:00:00.000Z',
    updatedAt: '2026-05-01T00:00:00.000Z',
    ...rest,
  };
};

const done = (number: string, day: string) => dive(number, { launch: `${day}T18:00:00.000Z`, onDeck: `${day}T23:00:00.000Z` });

describe('the next dive number', () => {
  it('follows the pattern of the dive planned last, keeping the width of its digits', () => {
    expect(nextDiveNumber([dive('VS-03'), dive('VS-04', { createdAt: '2026-05-02T00:00:00.000Z' })])).toBe('VS-05');
    expect(nextDiveNumber([dive('VS-09')])).toBe('VS-10');
    expect(nextDiveNumber([dive('VS-99')])).toBe('VS-100');
    expect(nextDiveNumber([dive('D7')])).toBe('D8');
  });

  it('counts on from the highest number of that pattern, whatever order they were planned in', () => {
    const dives = [dive('VS-05'), dive('VS-02', { createdAt: '2026-05-03T00:00:00.000Z' })];
    expect(nextDiveNumber(dives)).toBe('VS-06');
  });

  it('proposes nothing for a first dive or a pattern without a number', () => {
    expect(nextDiveNumber([])).toBe('');
    expect(nextDiveNumber([dive('test-dive')])).toBe('');
  });
});

describe('the order of the campaign’s dives', () => {
  const finished = [done('VS-01', '2026-05-12'), done('VS-02', '2026-05-13')];

  it('puts a dive under way first, then the rest newest first', () => {
    const underWay = dive('VS-03', { launch: '2026-05-14T18:00:00.000Z' });
    const planned = dive('VS-04', { plannedStartAt: '2026-05-16T18:00:00.000Z' });
    expect(orderDives([...finished, planned, underWay]).map((d) => d.number)).toEqual(['VS-03', 'VS-04', 'VS-02', 'VS-01']);
  });

  it('puts the next planned dive first when none is under way', () => {
    const later = dive('VS-05', { plannedStartAt: '2026-05-18T18:00:00.000Z' });
    const next = dive('VS-04', { plannedStartAt: '2026-05-16T18:00:00.000Z' });
    expect(currentDive([...finished, later, next])?.number).toBe('VS-04');
    expect(orderDives([...finished, later, next]).map((d) => d.number)).toEqual(['VS-04', 'VS-05', 'VS-02', 'VS-01']);
  });

  it('puts the latest dive first when every dive is finished', () => {
    expect(orderDives(finished).map((d) => d.number)).toEqual(['VS-02', 'VS-01']);
    expect(orderDives([])).toEqual([]);
  });
});
