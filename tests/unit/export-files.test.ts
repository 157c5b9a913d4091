/**
 * The GeoJSON, find register and CSV rows of the exports:
 * - GeoJSON: RFC 7946 (Butler et al., IETF, 2016), checked with @placemarkio/check-geojson
 *   0.1.14, plus our own order and range tests (it checks neither): §3.1.1 puts longitude first;
 * - CSV: RFC 4180 (Shafranovich, 2005), read back with csv-parse; formula injection per the
 *   OWASP "CSV Injection" page (cells starting with =, +, -, @, tab or CR);
 * - site plan east/north: compared with geographiclib-geodesic 2.2 (Karney 2013).
 */
import { check } from '@placemarkio/check-geojson';
import { parse } from 'csv-parse/sync';
import { Geodesic } from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';

import { csvRecord, CSV_BOM, CSV_LINE_END } from '@/lib/csv';
import { entryCsvColumns, findRegisterColumns, toEntryCsvRow, toFindRow, type EntryCsvEntry } from '@/lib/export-rows';
import { collectionHead, collectionTail, toFeature, type GeoEntry } from '@/lib/geojson';
import { naturalCompare } from '@/lib/natural-sort';

const geo: GeoEntry = {
  id: 'e1',
  diveId: 'd1',
  diveNumber: 'T-1',
  observedAt: '2026-05-13T21:14:07.250Z',
  kind: 'biology',
  title: 'Sponge',
  lat: 36.1,
  lon: -7.4,
  depth: 512.5,
  depthSource: 'telemetry',
  temperature: 10.8,
  tags: ['sponge'],
  scientificName: null,
  findNumber: null,
  authorName: 'Tester',
};

describe('GeoJSON (RFC 7946)', () => {
  it('writes [longitude, latitude] (§3.1.1): lat 36.1, lon −7.4 comes out as [-7.4, 36.1]', () => {
    expect(toFeature(geo, 'exact')!.geometry.coordinates).toEqual([-7.4, 36.1]);
  });

  it('has no third coordinate: depth is a property', () => {
    const f = toFeature(geo, 'exact')!;
    expect(f.geometry.coordinates).toHaveLength(2);
    expect(f.properties.depthM).toBe(512.5);
  });

  it('leaves out entries with no position, and withheld ones', () => {
    expect(toFeature({ ...geo, lat: null, lon: null }, 'exact')).toBeNull();
    expect(toFeature(geo, 'withheld')).toBeNull();
  });

  it('rounds positions to the grid for the public file', () => {
    const f = toFeature({ ...geo, lat: 36.14512, lon: -7.43207 }, 'grid-0.01')!;
    expect(f.geometry.coordinates).toEqual([-7.43, 36.15]);
    expect(f.properties.positionUncertaintyM).toBeGreaterThan(690);
  });

  it('is a valid FeatureCollection per check-geojson, with positions in range', () => {
    const features = [toFeature(geo, 'exact')!, toFeature({ ...geo, id: 'e2', lat: -89.9, lon: 179.9 }, 'exact')!];
    const text =
      collectionHead('Test') +
      features.map((f) => JSON.stringify(f)).join(',') +
      collectionTail({ withoutPosition: 2, withheld: 0 }, 'exact', '');
    const parsed = check(text) as unknown as { type: string; features: { geometry: { coordinates: number[] } }[]; omitted: unknown };
    expect(parsed.type).toBe('FeatureCollection');
    expect(parsed.omitted).toEqual({ withoutPosition: 2, positionWithheld: 0 });
    for (const f of parsed.features) {
      const [lon, lat] = f.geometry.coordinates as [number, number];
      expect(Math.abs(lon)).toBeLessThanOrEqual(180);
      expect(Math.abs(lat)).toBeLessThanOrEqual(90);
    }
  });

  it('check-geojson refuses a broken collection, so the check above can fail', () => {
    expect(() =>
      check('{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"Point","coordinates":["x"]}}]}'),
    ).toThrow();
  });
});

describe('find numbers in natural order', () => {
  it('puts VS26-2 before VS26-10, and ignores case', () => {
    expect(['VS26-10', 'VS26-2', 'vs26-1', 'VS26-100', 'VS26-9'].sort(naturalCompare)).toEqual([
      'vs26-1',
      'VS26-2',
      'VS26-9',
      'VS26-10',
      'VS26-100',
    ]);
    expect(['B-1', 'A-2', 'A-10'].sort(naturalCompare)).toEqual(['A-2', 'A-10', 'B-1']);
    expect(naturalCompare('VS26-2', 'VS26-02')).not.toBe(0);
  });
});

describe('find register rows', () => {
  const datum = { datumLat: 36.145, datumLon: -7.432, permitRef: 'P-7' };
  const find = {
    findNumber: 'T-3',
    objectType: 'amphora',
    material: 'ceramic',
    condition: 'complete',
    state: 'recovered' as const,
    diveNumber: 'T-1',
    observedAt: '2026-05-13T21:14:07.250Z',
    depth: 512.345,
    lat: 36.146,
    lon: -7.431,
    title: 'Amphora',
    entryId: 'e9',
    custody: [
      { holder: 'Pilot', location: 'Basket', container: null },
      { holder: 'Conservator', location: 'Wet lab', container: 'Tank 2' },
    ],
  };

  it('carries exact positions, east/north from the datum, custody and the permit', () => {
    const row = toFindRow(find, datum);
    expect(row).toMatchObject({
      lat: 36.146,
      lon: -7.431,
      holder: 'Conservator',
      place: 'Wet lab',
      container: 'Tank 2',
      handOvers: 1,
      permitRef: 'P-7',
      state: 'recovered',
    });
    // The plane distance agrees with the geodesic one to well under a centimetre at ~140 m.
    const g = Geodesic.WGS84.Inverse(36.145, -7.432, 36.146, -7.431);
    expect(Math.hypot(row.east as number, row.north as number)).toBeCloseTo(g.s12!, 1);
    expect(row.east as number).toBeGreaterThan(0);
    expect(row.north as number).toBeGreaterThan(0);
    expect(findRegisterColumns.find((c) => c.key === 'lat')!.header).toMatch(/exact/);
  });

  it('says in situ for a find left on the seabed, with no custody', () => {
    expect(toFindRow({ ...find, state: 'in-situ', custody: [] }, datum)).toMatchObject({ state: 'in situ', holder: null, handOvers: 0 });
  });
});

describe('CSV of entries', () => {
  const entry: EntryCsvEntry = {
    id: 'e1',
    diveNumber: 'T-1',
    observedAt: '2026-05-13T21:14:07.250Z',
    kind: 'biology',
    title: '=HYPERLINK("http://evil.test","click")',
    note: 'line one\nline "two", with comma',
    depth: 512.5,
    depthSource: 'manual',
    lat: 36.1,
    lon: -7.4,
    positionSource: 'manual',
    temperature: -1.5,
    tags: ['+tag', '@other'],
    scientificName: '-Munida',
    qualifier: null,
    verificationStatus: null,
    findNumber: null,
    authorName: '\tTab Person',
    photoCount: 0,
    createdAt: '2026-05-13T21:14:07.250Z',
    updatedAt: '2026-05-13T21:14:07.250Z',
    version: 1,
  };

  it('reads back with csv-parse, with formula cells neutralised and numbers left numeric', () => {
    const row = toEntryCsvRow(entry);
    const text =
      CSV_BOM +
      csvRecord(entryCsvColumns.map((c) => c.header)) +
      CSV_LINE_END +
      csvRecord(entryCsvColumns.map((c) => row[c.key])) +
      CSV_LINE_END;
    expect(text.startsWith('\ufeff')).toBe(true);
    const records = parse<Record<string, string>>(text, { bom: true, columns: true, record_delimiter: '\r\n' });
    expect(records).toHaveLength(1);
    const r = records[0]!;
    expect(r.title).toBe(`'=HYPERLINK("http://evil.test","click")`);
    expect(r.tags).toBe(`'+tag; @other`);
    expect(r.scientificName).toBe(`'-Munida`);
    expect(r.author).toBe(`'\tTab Person`);
    expect(r.note).toBe('line one\nline "two", with comma');
    expect(r.temperature).toBe('-1.5');
    expect(r.lon).toBe('-7.4');
    for (const value of Object.values(r)) expect(value).not.toMatch(/^[=+@\t\r]/);
  });
});
