import { describe, expect, it } from 'vitest';

import {
  formatInZone,
  formatLatLon,
  formatScientificName,
  formatUtc,
  formatUtcTime,
  parseUtcInput,
  toUtcInput,
  toUtcInputExact,
} from '@/lib/format';

// The suite runs under TZ=Pacific/Chatham (UTC+12:45 / +13:45): any local-time reading shows.
describe('typed UTC times', () => {
  it('reads what a person types as UTC, never as local time', () => {
    expect(parseUtcInput('2026-05-14 21:14:07')).toBe('2026-05-14T21:14:07.000Z');
    expect(parseUtcInput('2026-05-14T21:14:07.25Z')).toBe('2026-05-14T21:14:07.250Z');
    expect(parseUtcInput(' 2026-05-14 21:14 ')).toBe('2026-05-14T21:14:00.000Z');
  });

  it.each([
    '2026-13-01 10:00:00',
    '2026-00-15 10:00',
    '2026-02-30 10:00:00',
    '2025-02-29 10:00',
    '2026-04-31 10:00',
    '2026-05-00 10:00',
    '2026-05-14 24:00:00',
    '2026-05-14 21:60:00',
    '2026-05-14 21:14:61',
    '14/05/2026 21:14',
    '',
    'now',
  ])('refuses %j', (text) => {
    expect(parseUtcInput(text)).toBeNull();
  });

  it('takes the days that do exist at the ends of months (Gregorian calendar: 2024 is a leap year, 2026 is not)', () => {
    expect(parseUtcInput('2024-02-29 00:00')).toBe('2024-02-29T00:00:00.000Z');
    expect(parseUtcInput('2026-12-31 23:59:59.999')).toBe('2026-12-31T23:59:59.999Z');
    expect(parseUtcInput('2026-01-01 00:00')).toBe('2026-01-01T00:00:00.000Z');
  });

  it('round-trips through the editable form', () => {
    const iso = '2026-05-14T21:14:07.000Z';
    expect(parseUtcInput(toUtcInput(iso))).toBe(iso);
  });

  it('keeps milliseconds in the editable form when there are any, so a save does not shift the time', () => {
    expect(toUtcInputExact('2026-05-13T17:35:00.400Z')).toBe('2026-05-13 17:35:00.400');
    expect(toUtcInputExact('2026-05-13T17:35:00.000Z')).toBe('2026-05-13 17:35:00');
    expect(parseUtcInput(toUtcInputExact('2026-05-13T17:35:00.400Z'))).toBe('2026-05-13T17:35:00.400Z');
  });
});

describe('display', () => {
  it('shows UTC with its Z', () => {
    expect(formatUtc('2026-05-14T21:14:07.250Z')).toBe('2026-05-14 21:14:07Z');
    expect(formatUtc('2026-05-14T21:14:07.250Z', true)).toBe('2026-05-14 21:14:07.250Z');
    expect(formatUtcTime('2026-05-14T21:14:07.250Z')).toBe('21:14:07Z');
    expect(formatUtc('garbage')).toBe('—');
  });

  it('shows the same instant in a display zone (Lisbon is UTC+1 in May: common practice, EU summer time)', () => {
    expect(formatInZone('2026-05-14T21:14:07.000Z', 'Europe/Lisbon')).toMatch(/^2026-05-14 22:14:07 /);
    expect(formatInZone('2026-01-14T21:14:07.000Z', 'Europe/Lisbon')).toMatch(/^2026-01-14 21:14:07 /);
  });

  it('writes hemispheres instead of signs', () => {
    expect(formatLatLon(36.145, -7.432)).toBe('36.14500° N, 7.43200° W');
    expect(formatLatLon(null, 1)).toBe('—');
  });
});

describe('scientific names with qualifiers (open nomenclature, common practice)', () => {
  it('puts cf. and aff. before the doubted epithet, sp. and indet. after the name', () => {
    expect(formatScientificName('Munida sarsi', 'cf.')).toBe('Munida cf. sarsi');
    expect(formatScientificName('Desmophyllum pertusum', 'aff.')).toBe('Desmophyllum aff. pertusum');
    expect(formatScientificName('Munida', 'sp.')).toBe('Munida sp.');
    expect(formatScientificName('Ophiuroidea', 'indet.')).toBe('Ophiuroidea indet.');
    expect(formatScientificName('  Conger   conger ', null)).toBe('Conger conger');
  });
});
