import { describe, expect, it } from 'vitest';
import {
  EPOCH_MS_THRESHOLD,
  parseRow,
  parseStrictNumber,
  parseTime,
  recogniseHeaders,
  type ColumnMapping,
  type ParseRowOptions,
} from '../../lib/telemetry-columns';

const OPTIONS: ParseRowOptions = { latitudeDeg: 30, pressure: 'sea', gpsTime: false };

describe('recogniseHeaders', () => {
  it('recognises every channel by its short and long names', () => {
    const r = recogniseHeaders(['time', 'pressure_dbar', 'depth_m', 'lat', 'lon', 'heading', 'altitude_m', 'temperature_c', 'salinity']);
    expect(r.mapping).toEqual({
      time: 0,
      pressure: 1,
      depth: 2,
      lat: 3,
      lon: 4,
      heading: 5,
      altitude: 6,
      temperature: 7,
      salinity: 8,
    });
    expect(r.unknown).toEqual([]);
    expect(r.missingTime).toBe(false);
  });

  it('accepts each alias', () => {
    const cases: [string, string][] = [
      ['timestamp', 'time'],
      ['utc', 'time'],
      ['datetime', 'time'],
      ['pressure', 'pressure'],
      ['depth', 'depth'],
      ['latitude', 'lat'],
      ['longitude', 'lon'],
      ['long', 'lon'],
      ['altitude', 'altitude'],
      ['temperature', 'temperature'],
      ['temp', 'temperature'],
      ['temp_c', 'temperature'],
      ['Temp_DegC', 'temperature'],
      ['water_temp', 'temperature'],
      ['Water temp', 'temperature'],
    ];
    for (const [header, channel] of cases) {
      expect(recogniseHeaders([header]).mapping, header).toEqual({ [channel]: 0 });
    }
  });

  it('ignores case, surrounding spaces and a byte-order mark', () => {
    const r = recogniseHeaders(['\uFEFFTimeStamp', '  DEPTH ', 'Latitude', ' Longitude']);
    expect(r.mapping).toEqual({ time: 0, depth: 1, lat: 2, lon: 3 });
    expect(r.missingTime).toBe(false);
  });

  it('reads units in brackets', () => {
    const r = recogniseHeaders(['Time (UTC)', 'depth (m)', 'Pressure [dbar]', 'Temperature (°C)', 'heading(deg)', 'Altitude [ m ]']);
    expect(r.mapping).toEqual({ time: 0, depth: 1, pressure: 2, temperature: 3, heading: 4, altitude: 5 });
    expect(r.timeScale).toBe('utc');
  });

  it('notes a GPS time scale stated in the header', () => {
    expect(recogniseHeaders(['time (GPS)']).timeScale).toBe('gps');
    expect(recogniseHeaders(['time']).timeScale).toBeNull();
  });

  it('leaves columns in units it cannot convert unmapped and reports them', () => {
    const r = recogniseHeaders(['time', 'depth (ft)', 'temperature (°F)', 'pressure (psi)']);
    expect(r.mapping).toEqual({ time: 0 });
    expect(r.unsupportedUnits).toEqual([
      { header: 'depth (ft)', channel: 'depth', unit: 'ft' },
      { header: 'temperature (°F)', channel: 'temperature', unit: '°f' },
      { header: 'pressure (psi)', channel: 'pressure', unit: 'psi' },
    ]);
  });

  it('reports unknown columns and a missing time column', () => {
    const r = recogniseHeaders(['depth', 'pitch', 'roll']);
    expect(r.unknown).toEqual(['pitch', 'roll']);
    expect(r.missingTime).toBe(true);
    expect(r.mapping.time).toBeUndefined();
  });

  it('keeps the first column for a channel and reports the others', () => {
    const r = recogniseHeaders(['time', 'depth', 'depth_m']);
    expect(r.mapping.depth).toBe(1);
    expect(r.duplicates).toEqual([{ header: 'depth_m', channel: 'depth' }]);
  });

  it('applies an explicit mapping before recognition', () => {
    const r = recogniseHeaders(['Zeit', 'depth', 'CTD depth', 'temp'], {
      zeit: 'time',
      ' CTD Depth ': 'depth',
      temp: 'ignore',
    });
    expect(r.mapping).toEqual({ time: 0, depth: 2 });
    expect(r.duplicates).toEqual([{ header: 'depth', channel: 'depth' }]);
    expect(r.unknown).toEqual([]);
    expect(r.missingTime).toBe(false);
  });

  it('refuses an override that names no channel', () => {
    expect(() => recogniseHeaders(['a'], { a: 'speed' as never })).toThrow(RangeError);
  });
});

describe('parseTime', () => {
  it('reads ISO 8601 with Z', () => {
    expect(parseTime('2024-03-01T10:15:30Z')).toEqual({ ok: true, ms: Date.UTC(2024, 2, 1, 10, 15, 30) });
    expect(parseTime('2024-03-01T10:15:30.250Z')).toEqual({ ok: true, ms: Date.UTC(2024, 2, 1, 10, 15, 30, 250) });
    expect(parseTime('2024-03-01 10:15z')).toEqual({ ok: true, ms: Date.UTC(2024, 2, 1, 10, 15) });
    // Fractions beyond the millisecond are rounded: .1234567 s → 123 ms
    expect(parseTime('2024-03-01T10:15:30.1234567Z')).toEqual({ ok: true, ms: Date.UTC(2024, 2, 1, 10, 15, 30, 123) });
  });

  it('reads ISO 8601 with an offset', () => {
    // Chatham Islands standard time is UTC+12:45 (IANA tz database, Pacific/Chatham)
    expect(parseTime('2024-07-01T22:15:00+12:45')).toEqual({ ok: true, ms: Date.UTC(2024, 6, 1, 9, 30) });
    expect(parseTime('2024-07-01T22:15:00+1245')).toEqual({ ok: true, ms: Date.UTC(2024, 6, 1, 9, 30) });
    expect(parseTime('2024-07-01T02:00:00-05')).toEqual({ ok: true, ms: Date.UTC(2024, 6, 1, 7, 0) });
    expect(parseTime('2024-12-31T23:30:00-01:00')).toEqual({ ok: true, ms: Date.UTC(2025, 0, 1, 0, 30) });
  });

  it('refuses a time without a zone instead of reading it as local time', () => {
    const r = parseTime('2024-03-01T10:15:30');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('no-zone');
    expect(parseTime('2024-03-01 10:15:30.5').ok).toBe(false);
  });

  it('reads epoch seconds and epoch milliseconds by magnitude', () => {
    // 1 700 000 000 s = 2023-11-14T22:13:20Z (computed by hand: 19675 days + 80 000 s)
    expect(parseTime('1700000000')).toEqual({ ok: true, ms: Date.UTC(2023, 10, 14, 22, 13, 20) });
    expect(parseTime('1700000000.25')).toEqual({ ok: true, ms: Date.UTC(2023, 10, 14, 22, 13, 20, 250) });
    expect(parseTime('1700000000250')).toEqual({ ok: true, ms: Date.UTC(2023, 10, 14, 22, 13, 20, 250) });
    expect(parseTime(' 1700000000250 ')).toEqual({ ok: true, ms: Date.UTC(2023, 10, 14, 22, 13, 20, 250) });
  });

  it('switches from seconds to milliseconds at 1e11', () => {
    expect(EPOCH_MS_THRESHOLD).toBe(1e11);
    // 1e11 − 1 s is in the year 5138 and refused; 1e11 ms is 1973 and refused;
    // the first plausible ms value, 1980-01-01, is 315 532 800 000 (computed by hand)
    expect(parseTime(String(1e11 - 1)).ok).toBe(false);
    expect(parseTime('315532800000')).toEqual({ ok: true, ms: Date.UTC(1980, 0, 1) });
    expect(parseTime('315532800')).toEqual({ ok: true, ms: Date.UTC(1980, 0, 1) });
  });

  it('refuses elapsed seconds and microseconds', () => {
    const elapsed = parseTime('3600');
    expect(elapsed.ok).toBe(false);
    if (!elapsed.ok) expect(elapsed.code).toBe('out-of-range');
    expect(parseTime('1700000000250000').ok).toBe(false);
  });

  it('refuses malformed or impossible times', () => {
    for (const v of [
      'yesterday',
      '2024-03-01',
      '2023-02-29T00:00:00Z',
      '2024-03-01T24:00:00Z',
      '2024-03-01T10:61:00Z',
      '2024-13-01T00:00:00Z',
      '-1700000000',
      '1.7e9',
      '2024-03-01T10:15:30+25:00',
    ]) {
      const r = parseTime(v);
      expect(r.ok, v).toBe(false);
    }
    const empty = parseTime('  ');
    expect(empty.ok).toBe(false);
    if (!empty.ok) expect(empty.code).toBe('missing-time');
  });

  it('removes leap seconds from GPS time', () => {
    // GPS − UTC = 18 s since 2017-01-01 (IERS Bulletin C via leap-seconds.list)
    expect(parseTime('2024-03-01T10:15:48Z', { gpsTime: true })).toEqual({
      ok: true,
      ms: Date.UTC(2024, 2, 1, 10, 15, 30),
    });
    expect(parseTime('1700000018', { gpsTime: true })).toEqual({ ok: true, ms: Date.UTC(2023, 10, 14, 22, 13, 20) });
  });
});

describe('parseStrictNumber', () => {
  it('accepts plain decimals and refuses anything else', () => {
    expect(parseStrictNumber('-7.43')).toBe(-7.43);
    expect(parseStrictNumber(' +12 ')).toBe(12);
    expect(parseStrictNumber('.5')).toBe(0.5);
    expect(parseStrictNumber('1.5e3')).toBe(1500);
    for (const v of ['12abc', '0x1F', '1 000', 'Infinity', '', '-', '1,5', '1.2.3', 'NaN']) {
      expect(parseStrictNumber(v), v).toBeNull();
    }
  });

  it('reads decimal commas only when asked', () => {
    expect(parseStrictNumber('-7,43', true)).toBe(-7.43);
    expect(parseStrictNumber('-7.43', true)).toBeNull();
    expect(parseStrictNumber('1.234,5', true)).toBeNull();
    expect(parseStrictNumber('1,234,5', true)).toBeNull();
  });
});

describe('parseRow', () => {
  const headers = ['time', 'depth_m', 'lat', 'lon', 'heading', 'altitude_m', 'temperature_c', 'salinity'];
  const mapping = recogniseHeaders(headers).mapping;

  it('reads a full row', () => {
    const r = parseRow(['2024-03-01T10:15:30Z', '1234.5', '-41.3', '174.81', '-90', '2.5', '3.1', '34.7'], mapping, OPTIONS);
    expect(r).toEqual({
      ok: true,
      sample: {
        t: Date.UTC(2024, 2, 1, 10, 15, 30),
        depth: 1234.5,
        lat: -41.3,
        lon: 174.81,
        heading: 270, // −90° is 270° (computed by hand)
        altitude: 2.5,
        temperature: 3.1,
        salinity: 34.7,
      },
    });
  });

  it('treats empty and placeholder cells as absent channels', () => {
    const r = parseRow(['1700000000', '', 'NaN', ' n/a ', 'null', 'NA', '-1.85'], mapping, OPTIONS);
    expect(r).toEqual({ ok: true, sample: { t: Date.UTC(2023, 10, 14, 22, 13, 20), temperature: -1.85 } });
  });

  it('refuses a row with a bad number, naming the column', () => {
    const r = parseRow(['1700000000', '12abc'], mapping, OPTIONS);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.code).toBe('bad-number');
      expect(r.channel).toBe('depth');
      expect(r.reason).toContain('12abc');
    }
  });

  it('refuses values out of range', () => {
    const cases: [number, string, string][] = [
      [2, '90.01', 'lat'],
      [2, '-90.5', 'lat'],
      [3, '180.2', 'lon'],
      [1, '-5.1', 'depth'],
      [1, '11000.5', 'depth'],
      [4, '361', 'heading'],
      [6, '99', 'temperature'],
    ];
    for (const [index, value, channel] of cases) {
      const record = ['1700000000', '', '', '', '', '', '', ''];
      record[index] = value;
      const r = parseRow(record, mapping, OPTIONS);
      expect(r.ok, `${channel} ${value}`).toBe(false);
      if (!r.ok) {
        expect(r.code).toBe('out-of-range');
        expect(r.channel).toBe(channel);
      }
    }
    // Range limits are product choices (common practice): the limits themselves are accepted
    const edges = parseRow(['1700000000', '-5', '90', '-180', '0', '0', '-2', '0'], mapping, OPTIONS);
    expect(edges.ok).toBe(true);
  });

  it('refuses rows without a usable time', () => {
    const none = parseRow(['', '10'], mapping, OPTIONS);
    expect(none.ok).toBe(false);
    if (!none.ok) expect(none.code).toBe('missing-time');
    const local = parseRow(['2024-03-01T10:15:30', '10'], mapping, OPTIONS);
    expect(local.ok).toBe(false);
    if (!local.ok) expect(local.code).toBe('no-zone');
    const noColumn = parseRow(['10'], { depth: 0 }, OPTIONS);
    expect(noColumn.ok).toBe(false);
  });

  it('reads a row shorter than the header as missing trailing channels', () => {
    expect(parseRow(['1700000000', '12'], mapping, OPTIONS)).toEqual({
      ok: true,
      sample: { t: Date.UTC(2023, 10, 14, 22, 13, 20), depth: 12 },
    });
  });

  it('applies GPS time', () => {
    const r = parseRow(['1700000018', '12'], mapping, { ...OPTIONS, gpsTime: true });
    expect(r.ok && r.sample.t).toBe(Date.UTC(2023, 10, 14, 22, 13, 20));
  });

  it('reads decimal commas when the file uses them', () => {
    const r = parseRow(['1700000000', '1234,5', '-41,3'], mapping, { ...OPTIONS, decimalComma: true });
    expect(r.ok && r.sample).toEqual({ t: Date.UTC(2023, 10, 14, 22, 13, 20), depth: 1234.5, lat: -41.3 });
    expect(parseRow(['1700000000', '1234,5'], mapping, OPTIONS).ok).toBe(false);
  });

  describe('pressure-only logs', () => {
    const pressureMapping: ColumnMapping = recogniseHeaders(['time', 'pressure (dbar)', 'lat']).mapping;

    it('computes depth from sea pressure at the site latitude', () => {
      const r = parseRow(['1700000000', '10000', '-30'], pressureMapping, OPTIONS);
      expect(r.ok).toBe(true);
      if (r.ok) {
        expect(r.sample.pressure).toBe(10000);
        // Fofonoff & Millard 1983, UNESCO Tech. Pap. Mar. Sci. 44: 10000 dbar at 30° → 9712.653 m
        expect(Math.abs((r.sample.depth ?? 0) - 9712.653)).toBeLessThan(1e-3);
      }
    });

    it('subtracts the atmosphere from absolute pressure first', () => {
      // 10010.1325 dbar absolute − 10.1325 dbar (one standard atmosphere, common practice) = 10000 dbar
      const r = parseRow(['1700000000', '10010.1325'], pressureMapping, { ...OPTIONS, pressure: 'absolute' });
      expect(r.ok).toBe(true);
      if (r.ok) {
        expect(r.sample.pressure).toBeCloseTo(10000, 9);
        expect(Math.abs((r.sample.depth ?? 0) - 9712.653)).toBeLessThan(1e-3);
      }
    });

    it('leaves depth absent when pressure is absent', () => {
      expect(parseRow(['1700000000', ''], pressureMapping, OPTIONS)).toEqual({
        ok: true,
        sample: { t: Date.UTC(2023, 10, 14, 22, 13, 20) },
      });
    });

    it('refuses a pressure whose depth is beyond the deepest ocean', () => {
      // 11400 dbar at 30° is 11 041 m by UNESCO 1983 (Fofonoff & Millard 1983 DEPTH, computed), deeper than 11 000 m
      const r = parseRow(['1700000000', '11400'], pressureMapping, OPTIONS);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.code).toBe('out-of-range');
    });

    it('keeps a logged depth rather than computing one', () => {
      const both = recogniseHeaders(['time', 'pressure', 'depth']).mapping;
      const r = parseRow(['1700000000', '1000', ''], both, OPTIONS);
      expect(r.ok && r.sample).toEqual({ t: Date.UTC(2023, 10, 14, 22, 13, 20), pressure: 1000 });
    });

    it('needs a valid site latitude to compute depth', () => {
      expect(() => parseRow(['1700000000', '100'], pressureMapping, { ...OPTIONS, latitudeDeg: Number.NaN })).toThrow(RangeError);
    });
  });
});
