import { describe, expect, it } from 'vitest';
import { Geodesic } from 'geographiclib-geodesic';
import { distanceEN, fromLocalEN, geodesicInverse, toLocalEN, trackLengthM } from '../../lib/geodesy';

function directPoint(lat: number, lon: number, azimuthDeg: number, distanceM: number): { lat: number; lon: number } {
  const r = Geodesic.WGS84.Direct(lat, lon, azimuthDeg, distanceM);
  if (r.lat2 === undefined || r.lon2 === undefined) throw new Error('Direct returned no position');
  return { lat: r.lat2, lon: r.lon2 };
}

function separationM(a: { lat: number; lon: number }, b: { lat: number; lon: number }): number {
  return Geodesic.WGS84.Inverse(a.lat, a.lon, b.lat, b.lon).s12 ?? Number.NaN;
}

// Datums spread over hemispheres, both sides of the antimeridian, up to |lat| = 75°
const DATUMS = [
  { lat: 0, lon: 0 },
  { lat: 41.7325, lon: -49.9469 },
  { lat: -33.87, lon: 151.21 },
  { lat: 60.5, lon: 179.99 },
  { lat: -75, lon: -179.99 },
  { lat: 75, lon: 12.3 },
  { lat: -12.2, lon: 96.8 },
];
const AZIMUTHS = [0, 30, 77, 90, 135, 180, 222, 270, 315];

describe('geodesicInverse', () => {
  it('matches the published Wellington–Salamanca example', () => {
    const r = geodesicInverse(-41.32, 174.81, 40.96, -5.5);
    // geographiclib-geodesic 2.2 README (Karney 2022), "The distance is 19959679.267 m."
    // (method: Karney 2013, Algorithms for geodesics, J. Geodesy 87, 43–55)
    expect(Math.abs(r.distanceM - 19959679.267)).toBeLessThan(5e-4);
    // Azimuths 161.067669986° and 18.825195123° (GeographicLib documentation example, from memory)
    expect(r.azimuth1Deg).toBeCloseTo(161.067669986, 8);
    expect(r.azimuth2Deg).toBeCloseTo(18.825195123, 8);
  });

  it('gives a quarter meridian of 10001965.729 m from equator to pole', () => {
    // WGS 84 quarter meridian 10 001 965.729 m (Karney 2013, J. Geodesy 87, from memory)
    expect(geodesicInverse(0, 0, 90, 0).distanceM).toBeCloseTo(10001965.729, 3);
  });

  it('returns zero distance for coincident points', () => {
    // Coincident points are 0 m apart (computed by hand)
    expect(geodesicInverse(12.5, -70.1, 12.5, -70.1).distanceM).toBe(0);
  });

  it('rejects impossible coordinates', () => {
    expect(() => geodesicInverse(91, 0, 0, 0)).toThrow(RangeError);
    expect(() => geodesicInverse(0, Number.NaN, 0, 0)).toThrow(RangeError);
  });
});

describe('trackLengthM', () => {
  it('sums the geodesic legs', () => {
    const a = { lat: 10, lon: 20 };
    const b = directPoint(a.lat, a.lon, 45, 300);
    const c = directPoint(b.lat, b.lon, 180, 200);
    // Leg lengths chosen for Geodesic.WGS84.Direct: 300 m + 200 m (computed by hand)
    expect(trackLengthM([a, b, c])).toBeCloseTo(500, 6);
  });

  it('skips points without a usable position', () => {
    const a = { lat: -5, lon: 100 };
    const b = directPoint(a.lat, a.lon, 90, 1000);
    const withGaps = [a, { lat: null, lon: null }, { lat: 3 }, { lat: Number.NaN, lon: 1 }, { lat: 95, lon: 0 }, b];
    expect(trackLengthM(withGaps)).toBeCloseTo(1000, 6);
  });

  it('crosses the antimeridian by the short way', () => {
    const a = { lat: 0, lon: 179.999 };
    const b = { lat: 0, lon: -179.999 };
    // 0.002° of equator at a = 6378137 m: 6378137 × 0.002 × π/180 = 222.639 m (computed by hand)
    expect(trackLengthM([a, b])).toBeCloseTo(222.639, 2);
  });

  it('returns 0 for fewer than two positions', () => {
    expect(trackLengthM([])).toBe(0);
    expect(trackLengthM([{ lat: 1, lon: 1 }])).toBe(0);
  });
});

describe('site plan (local east/north)', () => {
  it('puts the datum at the origin', () => {
    for (const d of DATUMS) {
      const en = toLocalEN(d, d);
      expect(Math.abs(en.eastM)).toBeLessThan(1e-6);
      expect(Math.abs(en.northM)).toBeLessThan(1e-6);
    }
  });

  it('agrees with Geodesic.WGS84.Direct to 0.11 m at 1 km for |lat| ≤ 75°', () => {
    let worst = 0;
    for (const d of DATUMS) {
      for (const az of AZIMUTHS) {
        const truth = directPoint(d.lat, d.lon, az, 1000);
        const rad = (az * Math.PI) / 180;
        const planned = fromLocalEN(d, { eastM: 1000 * Math.sin(rad), northM: 1000 * Math.cos(rad) });
        worst = Math.max(worst, separationM(planned, truth));

        const en = toLocalEN(d, truth);
        const expectedEast = 1000 * Math.sin(rad);
        const expectedNorth = 1000 * Math.cos(rad);
        worst = Math.max(worst, Math.hypot(en.eastM - expectedEast, en.northM - expectedNorth));
      }
    }
    expect(worst).toBeLessThanOrEqual(0.11);
  });

  it('stays within 0.01 m of Geodesic.WGS84.Direct out to 10 km', () => {
    // The tangent plane departs from the ellipsoid as s³/R², about 8 mm at 10 km
    // (measured); wreck sites are far smaller, so the bound leaves ample margin.
    for (const d of DATUMS) {
      for (const az of AZIMUTHS) {
        const truth = directPoint(d.lat, d.lon, az, 10_000);
        const rad = (az * Math.PI) / 180;
        const planned = fromLocalEN(d, { eastM: 10_000 * Math.sin(rad), northM: 10_000 * Math.cos(rad) });
        expect(separationM(planned, truth)).toBeLessThan(0.01);
      }
    }
  });

  it('measures plan distances that match geodesic distances at site scale', () => {
    for (const d of DATUMS) {
      const p = directPoint(d.lat, d.lon, 60, 700);
      const q = directPoint(d.lat, d.lon, 200, 400);
      const planDistance = distanceEN(toLocalEN(d, p), toLocalEN(d, q));
      expect(Math.abs(planDistance - separationM(p, q))).toBeLessThan(0.11);
    }
  });

  it('round-trips fromLocalEN(toLocalEN(point))', () => {
    for (const d of DATUMS) {
      for (const az of AZIMUTHS) {
        const p = directPoint(d.lat, d.lon, az, 2500);
        const back = fromLocalEN(d, toLocalEN(d, p));
        expect(separationM(back, p)).toBeLessThan(0.001);
      }
    }
  });

  it('handles a datum at the pole', () => {
    const pole = { lat: 90, lon: 0 };
    const p = fromLocalEN(pole, { eastM: 0, northM: -1000 });
    // 1 km on the plan is 1 km on the ellipsoid to well under 0.05 m (the bound tested above)
    expect(separationM(p, pole)).toBeCloseTo(1000, 1);
  });

  it('rejects unusable coordinates', () => {
    expect(() => toLocalEN({ lat: Number.NaN, lon: 0 }, { lat: 0, lon: 0 })).toThrow(RangeError);
    expect(() => toLocalEN({ lat: 0, lon: 0 }, { lat: -90.1, lon: 0 })).toThrow(RangeError);
    expect(() => fromLocalEN({ lat: 0, lon: 0 }, { eastM: Number.POSITIVE_INFINITY, northM: 0 })).toThrow(RangeError);
  });

  it('computes plan distances', () => {
    // 3-4-5 triangle (computed by hand)
    expect(distanceEN({ eastM: 1, northM: 2 }, { eastM: 4, northM: 6 })).toBe(5);
  });
});
