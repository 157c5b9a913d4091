import { describe, expect, it } from 'vitest';

import { parseRow, plainRowReader, recogniseHeaders, type ParseRowOptions } from '../../lib/telemetry-columns';

const CHANNELS = ['depth', 'pressure', 'lat', 'lon', 'heading', 'altitude', 'temperature', 'salinity'] as const;
const OPTIONS: ParseRowOptions = { latitudeDeg: 36.1, pressure: 'sea', gpsTime: false };

/** What the full reader makes of a line, in the plain reader's layout, or null when it refuses the row. */
function fullRead(header: string[], line: string, options: ParseRowOptions): number[] | null {
  const result = parseRow(line.split(','), recogniseHeaders(header).mapping, options);
  if (!result.ok) return null;
  const s = result.sample;
  return [s.t, ...CHANNELS.map((c) => s[c] ?? Number.NaN)];
}

function plainRead(header: string[], line: string, options: ParseRowOptions): number[] | null {
  const read = plainRowReader(recogniseHeaders(header).mapping, options, header.length, ',', CHANNELS);
  if (!read) return null;
  const out = new Float64Array(1 + CHANNELS.length);
  return read(line, out) ? Array.from(out) : null;
}

const FULL = ['time', 'depth_m', 'pressure_dbar', 'lat', 'lon', 'heading', 'altitude_m', 'temperature_c', 'salinity'];

describe('plainRowReader', () => {
  it('reads the lines of a vehicle log as the full reader does, bit for bit', () => {
    const lines = [
      '2026-05-13T17:40:00.100Z,598.41,602.18,36.1450213,-7.4320456,359.9,2.50,10.812,35.700',
      '2026-05-13T17:40:00Z,0,0,0,0,0,0,0,0',
      '2026-05-13 23:59:59.5Z,-0.0,1.,.5,+7.25,-90,11000,-5,50',
      '2024-02-29T12:00:00.123456Z,1.7976931348623,0.1,0.2,0.3,0.7,0.3333333333333,44.999,0.30000000000001',
      '1747158000,12.5,,,,,,,',
      '1747158000250,12.5,,,,,,,',
    ];
    for (const line of lines) {
      const plain = plainRead(FULL, line, OPTIONS);
      expect(plain, line).not.toBeNull();
      expect(plain, line).toEqual(fullRead(FULL, line, OPTIONS));
    }
  });

  it('reads random decimals exactly as Number reads them', () => {
    let seed = 7;
    const next = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    for (let i = 0; i < 20_000; i++) {
      const decimals = Math.floor(next() * 9);
      const text = (next() * 600 - 5).toFixed(decimals);
      const line = `2026-05-13T17:40:00.000Z,${text},,,,,,,`;
      expect(plainRead(FULL, line, OPTIONS)?.[1], text).toBe(Number(text));
    }
  });

  it('leaves to the full reader every line it is not sure of', () => {
    const unsure = [
      '2026-05-13T17:40:00+02:00,1,,,,,,,', // an offset
      '2026-05-13T17:40:00,1,,,,,,,', // no zone
      '2026-02-30T17:40:00Z,1,,,,,,,', // no such day
      '2026-05-13T24:00:00Z,1,,,,,,,',
      '2026-05-13T17:40:00Z, 1,,,,,,,', // a space
      '2026-05-13T17:40:00Z,1e2,,,,,,,', // an exponent
      '2026-05-13T17:40:00Z,NaN,,,,,,,',
      '2026-05-13T17:40:00Z,11001,,,,,,,', // out of range
      '2026-05-13T17:40:00Z,1,,,,,,', // a field short
      '2026-05-13T17:40:00Z,1,,,,,,,,', // a field over
      '2026-05-13T17:40:00Z,1.2345678901234567,,,,,,,', // more digits than a double holds exactly
      ',1,,,,,,,',
      '1969-12-31T23:59:59Z,1,,,,,,,',
    ];
    for (const line of unsure) expect(plainRead(FULL, line, OPTIONS), line).toBeNull();
  });

  it('turns headings into 0 to 360, absolute pressure into sea pressure, and pressure into depth, as the full reader does', () => {
    const header = ['time', 'pressure_dbar', 'heading'];
    const options: ParseRowOptions = { ...OPTIONS, pressure: 'absolute', gpsTime: true };
    const mapping = recogniseHeaders(header).mapping;
    const read = plainRowReader(mapping, options, header.length, ',', CHANNELS)!;
    const out = new Float64Array(1 + CHANNELS.length);
    for (const line of ['2026-05-13T17:40:00.000Z,610.25,-45.5', '1747158000,10.13,-180']) {
      expect(read(line, out), line).toBe(true);
      const full = parseRow(line.split(','), mapping, options);
      if (!full.ok) throw new Error(line);
      expect(Array.from(out)).toEqual([full.sample.t, ...CHANNELS.map((c) => full.sample[c] ?? Number.NaN)]);
    }
  });

  it('declines a log with decimal commas, for which it has no reading', () => {
    expect(plainRowReader({ time: 0, depth: 1 }, { ...OPTIONS, decimalComma: true }, 2, ';', CHANNELS)).toBeNull();
  });
});
