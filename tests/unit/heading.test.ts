import { describe, expect, it } from 'vitest';

import { formatHeading, headingDifference, headingTurn, interpolateHeading, wrapHeading } from '../../lib/heading';

// Every expected value here is worked here by hand on a compass rose: no published table is needed
// for turns between two headings, and none is claimed.
describe('wrapHeading', () => {
  it('brings any angle into [0, 360)', () => {
    expect(wrapHeading(0)).toBe(0);
    expect(wrapHeading(360)).toBe(0); // worked here: a full turn is north again
    expect(wrapHeading(-10)).toBe(350); // worked here: 10° anticlockwise of north
    expect(wrapHeading(725)).toBe(5); // worked here: 725 − 2·360
    expect(wrapHeading(-1e-14)).toBeLessThan(360);
  });
});

describe('headingTurn and headingDifference', () => {
  it('measures across north the short way', () => {
    expect(headingDifference(359, 1)).toBe(2); // worked here: 1° to north, 1° past it
    expect(headingTurn(359, 1)).toBe(2); // worked here: clockwise
    expect(headingTurn(1, 359)).toBe(-2); // worked here: anticlockwise
    expect(headingDifference(350, 10)).toBe(20); // worked here: 10° + 10°
  });

  it('measures away from north like plain subtraction', () => {
    expect(headingTurn(90, 135)).toBe(45); // worked here: east to south-east
    expect(headingTurn(270, 180)).toBe(-90); // worked here: west to south, anticlockwise
    expect(headingDifference(10, 200)).toBe(170); // worked here: 190° clockwise is the long way
  });

  it('calls opposite headings a half turn', () => {
    expect(headingDifference(0, 180)).toBe(180);
    expect(headingDifference(270, 90)).toBe(180);
  });
});

describe('interpolateHeading', () => {
  it('puts the midpoint of 350° and 10° at north', () => {
    expect(interpolateHeading(350, 10, 0.5)).toBe(0); // worked here: 350 + 0.5·20 = 360 → 0
    expect(interpolateHeading(10, 350, 0.5)).toBe(0); // worked here: 10 − 0.5·20 = 0
  });

  it('steps through north in the direction of the turn', () => {
    expect(interpolateHeading(350, 10, 0.25)).toBeCloseTo(355, 12); // worked here: 350 + 5
    expect(interpolateHeading(350, 10, 0.75)).toBeCloseTo(5, 12); // worked here: 350 + 15 − 360
    expect(interpolateHeading(359, 1, 0.5)).toBe(0); // worked here: 359 + 1
    expect(interpolateHeading(5, 345, 0.5)).toBe(355); // worked here: 5 − 10 = −5 → 355
  });

  it('keeps the ends and ordinary headings', () => {
    expect(interpolateHeading(350, 10, 0)).toBe(350);
    expect(interpolateHeading(350, 10, 1)).toBe(10);
    expect(interpolateHeading(90, 180, 0.5)).toBe(135); // worked here: halfway east to south
  });
});

describe('formatHeading', () => {
  it('writes whole degrees with three figures and north as 000°', () => {
    expect(formatHeading(7.2)).toBe('007°');
    expect(formatHeading(359.6)).toBe('000°'); // worked here: rounds to 360, which is north
    expect(formatHeading(245)).toBe('245°');
    expect(formatHeading(null)).toBe('—');
  });
});
