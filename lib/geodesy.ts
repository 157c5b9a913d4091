/**
 * Distances and site-plan coordinates on the WGS 84 ellipsoid.
 *
 * Geodesic distances come from GeographicLib (Karney 2013, "Algorithms for
 * geodesics", J. Geodesy 87, 43–55), accurate to nanometres anywhere on
 * Earth, including nearly antipodal points.
 *
 * The site plan is a local east/north plane tangent to the ellipsoid at a
 * datum point (the ENU frame obtained by rotating WGS 84 Earth-centred,
 * Earth-fixed coordinates). A wreck site spans at most a few kilometres, over
 * which the plane departs from geodesic distances by millimetres.
 */
import * as geographiclib from 'geographiclib-geodesic';

// The package is CommonJS (`module.exports = geo`). Bundlers and CommonJS
// loaders expose its members on the namespace, but Node's ES module loader
// cannot detect them and only provides `default`; accept either shape.
const { Geodesic } = (geographiclib as typeof geographiclib & { default?: typeof geographiclib }).default ?? geographiclib;

/** A geographic position in degrees (WGS 84). */
export interface LatLon {
  lat: number;
  lon: number;
}

/** A position on the local site plan, metres east and north of the datum. */
export interface LocalEN {
  eastM: number;
  northM: number;
}

/** Result of the inverse geodesic problem. */
export interface GeodesicInverse {
  /** Length of the shortest path in metres. */
  distanceM: number;
  /** Azimuth at the first point, degrees clockwise from north, (−180, 180]. */
  azimuth1Deg: number;
  /** Forward azimuth at the second point, degrees clockwise from north, (−180, 180]. */
  azimuth2Deg: number;
}

const WGS84_A = 6378137;
const WGS84_F = 1 / 298.257223563;
const WGS84_E2 = WGS84_F * (2 - WGS84_F);
const DEG_TO_RAD = Math.PI / 180;
const RAD_TO_DEG = 180 / Math.PI;
const INVERSE_MASK = Geodesic.DISTANCE | Geodesic.AZIMUTH;

function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

function isValidPosition(lat: unknown, lon: unknown): boolean {
  return isFiniteNumber(lat) && isFiniteNumber(lon) && Math.abs(lat) <= 90;
}

/**
 * Shortest path between two points on the WGS 84 ellipsoid.
 *
 * @param lat1 latitude of the first point, degrees
 * @param lon1 longitude of the first point, degrees
 * @param lat2 latitude of the second point, degrees
 * @param lon2 longitude of the second point, degrees
 * @throws RangeError when a coordinate is not finite or a latitude exceeds ±90°
 */
export function geodesicInverse(lat1: number, lon1: number, lat2: number, lon2: number): GeodesicInverse {
  if (!isValidPosition(lat1, lon1) || !isValidPosition(lat2, lon2)) {
    throw new RangeError('geodesicInverse: coordinates must be finite with |latitude| ≤ 90°');
  }
  const r = Geodesic.WGS84.Inverse(lat1, lon1, lat2, lon2, INVERSE_MASK);
  return {
    distanceM: r.s12 ?? Number.NaN,
    azimuth1Deg: r.azi1 ?? Number.NaN,
    azimuth2Deg: r.azi2 ?? Number.NaN,
  };
}

/**
 * Total length of a track in metres, summing geodesic legs between
 * consecutive points. Points without a usable position (missing, non-finite or
 * impossible coordinates) are skipped, so the leg bridges them.
 */
export function trackLengthM(points: ReadonlyArray<{ lat?: number | null; lon?: number | null }>): number {
  let total = 0;
  let prev: LatLon | null = null;
  for (const p of points) {
    if (!isValidPosition(p.lat, p.lon)) continue;
    const here: LatLon = { lat: p.lat as number, lon: p.lon as number };
    if (prev !== null) {
      total += Geodesic.WGS84.Inverse(prev.lat, prev.lon, here.lat, here.lon, Geodesic.DISTANCE).s12 ?? 0;
    }
    prev = here;
  }
  return total;
}

interface Ecef {
  x: number;
  y: number;
  z: number;
}

function toEcef(latDeg: number, lonDeg: number): Ecef {
  const phi = latDeg * DEG_TO_RAD;
  const lambda = lonDeg * DEG_TO_RAD;
  const sinPhi = Math.sin(phi);
  const cosPhi = Math.cos(phi);
  const n = WGS84_A / Math.sqrt(1 - WGS84_E2 * sinPhi * sinPhi);
  return {
    x: n * cosPhi * Math.cos(lambda),
    y: n * cosPhi * Math.sin(lambda),
    z: n * (1 - WGS84_E2) * sinPhi,
  };
}

/**
 * Geodetic latitude and longitude of an ECEF point near the ellipsoid surface.
 * The height is written as p·cosφ + z·sinφ − a²/N, which stays well conditioned
 * at the poles, unlike the more common p/cosφ − N.
 */
function fromEcef(e: Ecef): LatLon {
  const p = Math.hypot(e.x, e.y);
  let phi = Math.atan2(e.z, p * (1 - WGS84_E2));
  for (let i = 0; i < 6; i++) {
    const sinPhi = Math.sin(phi);
    const n = WGS84_A / Math.sqrt(1 - WGS84_E2 * sinPhi * sinPhi);
    const h = p * Math.cos(phi) + e.z * sinPhi - (WGS84_A * WGS84_A) / n;
    const next = Math.atan2(e.z, p * (1 - (WGS84_E2 * n) / (n + h)));
    const done = Math.abs(next - phi) < 1e-15;
    phi = next;
    if (done) break;
  }
  return { lat: phi * RAD_TO_DEG, lon: Math.atan2(e.y, e.x) * RAD_TO_DEG };
}

function assertDatum(datum: LatLon): void {
  if (!isValidPosition(datum.lat, datum.lon)) {
    throw new RangeError('site datum must have finite coordinates with |latitude| ≤ 90°');
  }
}

/**
 * Position of a point on the site plan of a datum: metres east and north in
 * the plane tangent to WGS 84 at the datum. The small height of the point
 * below that plane is dropped.
 *
 * @throws RangeError when either position is not finite or has |latitude| > 90°
 */
export function toLocalEN(datum: LatLon, point: LatLon): LocalEN {
  assertDatum(datum);
  if (!isValidPosition(point.lat, point.lon)) {
    throw new RangeError('toLocalEN: point must have finite coordinates with |latitude| ≤ 90°');
  }
  const o = toEcef(datum.lat, datum.lon);
  const q = toEcef(point.lat, point.lon);
  const dx = q.x - o.x;
  const dy = q.y - o.y;
  const dz = q.z - o.z;
  const phi = datum.lat * DEG_TO_RAD;
  const lambda = datum.lon * DEG_TO_RAD;
  const sinPhi = Math.sin(phi);
  const cosPhi = Math.cos(phi);
  const sinLambda = Math.sin(lambda);
  const cosLambda = Math.cos(lambda);
  return {
    eastM: -sinLambda * dx + cosLambda * dy,
    northM: -sinPhi * cosLambda * dx - sinPhi * sinLambda * dy + cosPhi * dz,
  };
}

/**
 * Inverse of {@link toLocalEN}: the geographic position of a site-plan point,
 * taking it to lie in the tangent plane at the datum. Longitude is in
 * (−180, 180].
 *
 * @throws RangeError when the datum or the plan coordinates are not finite
 */
export function fromLocalEN(datum: LatLon, en: LocalEN): LatLon {
  assertDatum(datum);
  if (!isFiniteNumber(en.eastM) || !isFiniteNumber(en.northM)) {
    throw new RangeError('fromLocalEN: eastM and northM must be finite');
  }
  const o = toEcef(datum.lat, datum.lon);
  const phi = datum.lat * DEG_TO_RAD;
  const lambda = datum.lon * DEG_TO_RAD;
  const sinPhi = Math.sin(phi);
  const cosPhi = Math.cos(phi);
  const sinLambda = Math.sin(lambda);
  const cosLambda = Math.cos(lambda);
  const { eastM: e, northM: n } = en;
  return fromEcef({
    x: o.x - sinLambda * e - sinPhi * cosLambda * n,
    y: o.y + cosLambda * e - sinPhi * sinLambda * n,
    z: o.z + cosPhi * n,
  });
}

/** Straight-line distance in metres between two site-plan points. */
export function distanceEN(a: LocalEN, b: LocalEN): number {
  return Math.hypot(a.eastM - b.eastM, a.northM - b.northM);
}
