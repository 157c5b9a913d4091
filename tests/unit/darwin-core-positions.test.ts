/**
 * Protected positions in public exports. Rounding a sensitive position to a grid and widening
 * its uncertainty to the cell follows the practice of Chapman, A.D. (2020), "Current Best
 * Practices for Generalizing Sensitive Species Occurrence Data", GBIF Secretariat; distances are
 * compared with geographiclib-geodesic 2.2 (Karney 2013, "Algorithms for geodesics",
 * J. Geodesy 87), the reference library for geodesics.
 */
import { Geodesic } from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';

import { toOccurrence, type DwcEntry } from '@/lib/darwin-core';
import { cellRadiusM, publicBox, publicPosition, snapToGrid } from '@/lib/position-protection';

const distance = (lat1: number, lon1: number, lat2: number, lon2: number) => Geodesic.WGS84.Inverse(lat1, lon1, lat2, lon2).s12!;

const onGrid = (value: number, step: number) => Math.abs(value / step - Math.round(value / step)) < 1e-9;

describe('rounding to a grid', () => {
  it('puts positions on the 0.01° and 0.1° grids, written without floating-point dust', () => {
    expect(snapToGrid(36.14512, 0.01)).toBe(36.15);
    expect(snapToGrid(-7.43207, 0.01)).toBe(-7.43);
    expect(snapToGrid(36.14512, 0.1)).toBe(36.1);
    expect(snapToGrid(-7.43207, 0.1)).toBe(-7.4);
    expect(snapToGrid(-0.004, 0.01)).toBe(0);
    expect(Object.is(snapToGrid(-0.004, 0.01), -0)).toBe(false);
  });

  it('widens the uncertainty to the farthest corner of the cell, so every position that rounds there lies inside it', () => {
    for (const [lat, lon, step] of [
      [36.14512, -7.43207, 0.01],
      [36.14512, -7.43207, 0.1],
      [-62.2, 58.9, 0.1],
      [0.004, 179.996, 0.01],
    ] as const) {
      const p = publicPosition({ lat, lon }, step === 0.01 ? 'grid-0.01' : 'grid-0.1')!;
      expect(onGrid(p.lat, step) && onGrid(p.lon, step)).toBe(true);
      // The true position itself, and points all over the cell, are within the stated radius.
      expect(distance(p.lat, p.lon, lat, lon)).toBeLessThanOrEqual(p.uncertaintyM!);
      for (let i = 0; i <= 10; i++) {
        for (let j = 0; j <= 10; j++) {
          const qLat = p.lat - step / 2 + (step * i) / 10;
          const qLon = p.lon - step / 2 + (step * j) / 10;
          expect(distance(p.lat, p.lon, qLat, qLon)).toBeLessThanOrEqual(p.uncertaintyM!);
        }
      }
      // …and the radius is no larger than it needs to be (a metre of rounding up).
      const corner = Math.max(
        distance(p.lat, p.lon, p.lat + step / 2, p.lon + step / 2),
        distance(p.lat, p.lon, p.lat - step / 2, p.lon + step / 2),
      );
      expect(p.uncertaintyM! - corner).toBeLessThan(1);
    }
  });

  it('gives a 0.01° cell at 36.1° N a radius of about 0.7 km and a 0.1° cell about 7 km', () => {
    // Half a cell is 0.005° of latitude (≈ 555 m) by 0.005° of longitude (≈ 450 m at this latitude).
    const small = cellRadiusM(36.15, -7.43, 0.01);
    const reference = distance(36.15, -7.43, 36.155, -7.425);
    expect(Math.abs(small - Math.max(reference, distance(36.15, -7.43, 36.145, -7.425)))).toBeLessThan(1e-6);
    expect(small).toBeGreaterThan(690);
    expect(small).toBeLessThan(730);
    expect(cellRadiusM(36.1, -7.4, 0.1)).toBeGreaterThan(6_900);
    expect(cellRadiusM(36.1, -7.4, 0.1)).toBeLessThan(7_300);
  });

  it('adds any uncertainty the position already had', () => {
    const plain = publicPosition({ lat: 36.14512, lon: -7.43207 }, 'grid-0.01')!;
    const fuzzy = publicPosition({ lat: 36.14512, lon: -7.43207, uncertaintyM: 50 }, 'grid-0.01')!;
    expect(fuzzy.uncertaintyM! - plain.uncertaintyM!).toBeGreaterThanOrEqual(49);
    expect(fuzzy.uncertaintyM! - plain.uncertaintyM!).toBeLessThanOrEqual(51);
  });

  it('leaves exact positions alone and gives nothing when they are withheld', () => {
    expect(publicPosition({ lat: 36.14512, lon: -7.43207 }, 'exact')).toEqual({ lat: 36.14512, lon: -7.43207, uncertaintyM: null });
    expect(publicPosition({ lat: 36.14512, lon: -7.43207 }, 'withheld')).toBeNull();
    expect(publicBox({ south: 1, north: 2, west: 3, east: 4 }, 'withheld')).toBeNull();
  });
});

describe('occurrence rows with protected positions', () => {
  const entry: DwcEntry = {
    id: 'e1',
    diveId: 'd1',
    diveNumber: 'T-1',
    campaignId: 'c1',
    observedAt: '2026-05-13T21:14:07.250Z',
    updatedAt: '2026-05-13T21:14:07.250Z',
    title: 'Sponge',
    lat: 36.14512,
    lon: -7.43207,
    depth: 500,
    authorName: 'Tester',
    sampled: false,
    identification: null,
    photoUrls: [],
    individualCount: null,
    organismQuantity: null,
    organismQuantityType: null,
    substrate: null,
    sample: null,
    sizes: [],
  };
  const row = (positions: 'exact' | 'grid-0.01' | 'grid-0.1' | 'withheld') =>
    toOccurrence(entry, { licence: 'CC-BY-4.0', rightsHolder: 'Lead', positions, vehicle: null });

  it('rounded: on the grid, uncertainty widened, and dataGeneralizations says how', () => {
    const r = row('grid-0.1');
    expect([r.decimalLatitude, r.decimalLongitude]).toEqual([36.1, -7.4]);
    expect(r.coordinateUncertaintyInMeters).toBeGreaterThan(6_900);
    expect(r.dataGeneralizations).toMatch(/0\.1°/);
    expect(r.informationWithheld).toBeNull();
  });

  it('withheld: no coordinates, no datum, and informationWithheld says so', () => {
    const r = row('withheld');
    expect([r.decimalLatitude, r.decimalLongitude, r.geodeticDatum, r.coordinateUncertaintyInMeters]).toEqual([null, null, null, null]);
    expect(r.informationWithheld).toMatch(/withheld/);
    expect(JSON.stringify(r)).not.toMatch(/36\.1|7\.4/);
  });

  it('exact: as recorded, with nothing generalised or withheld', () => {
    const r = row('exact');
    expect([r.decimalLatitude, r.decimalLongitude]).toEqual([36.14512, -7.43207]);
    expect(r.dataGeneralizations).toBeNull();
    expect(r.informationWithheld).toBeNull();
  });
});
