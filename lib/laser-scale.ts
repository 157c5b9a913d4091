/**
 * Measuring on a photo with the laser scale: two parallel lasers a known distance apart leave two
 * dots on the subject, so the scale in the plane of the dots is spacing ÷ pixel distance between
 * them. Lengths (a polyline of two or more points) and areas (a polygon of three or more points,
 * by the shoelace formula) are measured in the photo's original pixels and scaled to cm and cm².
 *
 * Uncertainty, by first-order (linear) error propagation: every placed point — both laser dots and
 * every point of the measurement — is taken to be off by up to `placementPx` in x and in y, each
 * coordinate independently. The value V is a function of all these coordinates, so
 *
 *   δV = placementPx · √( Σ over every coordinate c of (∂V/∂c)² )
 *
 * with the partial derivatives worked out exactly below (not by finite differences). For a length
 * V = S · L / d (S the spacing, L the polyline's pixel length, d the dots' pixel distance);
 * for an area V = S² · A / d². The spacing itself is taken as exact.
 */

export type Point = readonly [number, number];

export type MeasurementKind = 'length' | 'area';

/** Unit of each kind's value. */
export const measurementUnits = { length: 'cm', area: 'cm²' } as const;
export type MeasurementUnit = (typeof measurementUnits)[MeasurementKind];

/** How far a point placed by hand may be off, in pixels, unless the person placed it more finely. */
export const defaultPlacementPx = 2;

/** Laser dots closer than this give a scale too coarse to trust. */
export const minLaserDistancePx = 10;

/** The laser spacing offered when neither the dive nor the person has given one (common practice: 10 cm). */
export const defaultSpacingCm = 10;

export type MeasureInput = {
  spacingCm: number;
  laser: readonly [Point, Point];
  kind: MeasurementKind;
  points: readonly Point[];
  placementPx?: number;
  /** The photo's original size: every point must lie on it. */
  image?: { width: number; height: number };
};

export type MeasureResult = {
  value: number;
  unit: MeasurementUnit;
  uncertainty: number;
  /** cm per pixel in the plane of the laser dots. */
  scaleCmPerPx: number;
  laserDistancePx: number;
};

/** A problem with the input, with the field it belongs to (`laser`, `points.2`, …). */
export class MeasureError extends Error {
  constructor(
    readonly path: string,
    message: string,
  ) {
    super(message);
  }
}

const distance = (a: Point, b: Point) => Math.hypot(b[0] - a[0], b[1] - a[1]);

/** Pixel length of a polyline. */
export function polylineLengthPx(points: readonly Point[]): number {
  let sum = 0;
  for (let i = 1; i < points.length; i++) sum += distance(points[i - 1]!, points[i]!);
  return sum;
}

/** Pixel area of a simple polygon by the shoelace formula (always positive). */
export function polygonAreaPx(points: readonly Point[]): number {
  return Math.abs(signedArea(points));
}

function signedArea(points: readonly Point[]): number {
  let twice = 0;
  for (let i = 0; i < points.length; i++) {
    const [x1, y1] = points[i]!;
    const [x2, y2] = points[(i + 1) % points.length]!;
    twice += x1 * y2 - x2 * y1;
  }
  return twice / 2;
}

/** Σ of the squared gradient of a polyline's length over all its points' coordinates. */
function polylineGradientSq(points: readonly Point[]): number {
  let sum = 0;
  for (let i = 0; i < points.length; i++) {
    let gx = 0;
    let gy = 0;
    // Each segment pulls its two ends along its own unit vector.
    if (i > 0) {
      const d = distance(points[i - 1]!, points[i]!);
      if (d > 0) {
        gx += (points[i]![0] - points[i - 1]![0]) / d;
        gy += (points[i]![1] - points[i - 1]![1]) / d;
      }
    }
    if (i < points.length - 1) {
      const d = distance(points[i]!, points[i + 1]!);
      if (d > 0) {
        gx -= (points[i + 1]![0] - points[i]![0]) / d;
        gy -= (points[i + 1]![1] - points[i]![1]) / d;
      }
    }
    sum += gx * gx + gy * gy;
  }
  return sum;
}

/** Σ of the squared gradient of a polygon's area over all its vertices' coordinates. */
function polygonGradientSq(points: readonly Point[]): number {
  const n = points.length;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const prev = points[(i - 1 + n) % n]!;
    const next = points[(i + 1) % n]!;
    // ∂A/∂x_i = ½(y_{i+1} − y_{i−1}), ∂A/∂y_i = ½(x_{i−1} − x_{i+1}); the sign of A drops out when squared.
    const gx = (next[1] - prev[1]) / 2;
    const gy = (prev[0] - next[0]) / 2;
    sum += gx * gx + gy * gy;
  }
  return sum;
}

function checkPoint(p: Point, path: string, image: MeasureInput['image']) {
  if (!Number.isFinite(p[0]) || !Number.isFinite(p[1])) throw new MeasureError(path, 'A point needs two finite numbers');
  if (image && (p[0] < 0 || p[1] < 0 || p[0] > image.width || p[1] > image.height)) {
    throw new MeasureError(path, `The point (${p[0]}, ${p[1]}) lies outside the photo (${image.width} × ${image.height} pixels)`);
  }
}

/** The value of a measurement and its uncertainty; throws `MeasureError` on input that cannot be measured. */
export function measure(input: MeasureInput): MeasureResult {
  const { spacingCm, laser, kind, points, image } = input;
  const placement = input.placementPx ?? defaultPlacementPx;
  if (!(spacingCm > 0) || !Number.isFinite(spacingCm)) throw new MeasureError('spacingCm', 'The laser spacing is more than 0 cm');
  if (!(placement > 0) || !Number.isFinite(placement)) throw new MeasureError('placementPx', 'The placement precision is more than 0 px');
  laser.forEach((p, i) => checkPoint(p, `laser.${i}`, image));
  points.forEach((p, i) => checkPoint(p, `points.${i}`, image));

  const d = distance(laser[0], laser[1]);
  if (d < minLaserDistancePx) {
    throw new MeasureError(
      'laser',
      d === 0
        ? 'The two laser dots are on the same pixel: mark each dot once'
        : `The laser dots are ${d.toFixed(1)} px apart; at least ${minLaserDistancePx} px are needed for a usable scale`,
    );
  }
  const scale = spacingCm / d;
  // Each laser dot moves d along the line between them: Σ(∂d/∂c)² = 2.
  const laserGradSq = 2;

  if (kind === 'length') {
    if (points.length < 2) throw new MeasureError('points', 'A length needs at least 2 points');
    const lengthPx = polylineLengthPx(points);
    if (lengthPx === 0) throw new MeasureError('points', 'The points are all on one pixel: the length is 0');
    const value = scale * lengthPx;
    // ∂V/∂L = S/d; ∂V/∂d = −V/d.
    const variance = (scale * scale * polylineGradientSq(points) + (value / d) ** 2 * laserGradSq) * placement * placement;
    return { value, unit: measurementUnits.length, uncertainty: Math.sqrt(variance), scaleCmPerPx: scale, laserDistancePx: d };
  }

  if (points.length < 3) throw new MeasureError('points', 'An area needs at least 3 points');
  const areaPx = polygonAreaPx(points);
  if (areaPx === 0) throw new MeasureError('points', 'The points lie on one line: the area is 0');
  const value = scale * scale * areaPx;
  // ∂V/∂A = S²/d²; ∂V/∂d = −2V/d.
  const variance = (scale ** 4 * polygonGradientSq(points) + ((2 * value) / d) ** 2 * laserGradSq) * placement * placement;
  return { value, unit: measurementUnits.area, uncertainty: Math.sqrt(variance), scaleCmPerPx: scale, laserDistancePx: d };
}

/** Decimals that show an uncertainty to one significant figure (two when it starts with 1); 1 when there is none. */
export function decimalsFor(uncertainty: number): number {
  if (!(uncertainty > 0)) return 1;
  const magnitude = Math.floor(Math.log10(uncertainty));
  const leading = uncertainty / 10 ** magnitude;
  return Math.max(0, -(magnitude - (leading < 2 ? 1 : 0)));
}

/** "30.0 ± 0.9 cm": the uncertainty to one significant figure (two when it starts with 1), the value to match. */
export function formatMeasurement(m: { value: number; uncertainty: number; unit: string }): string {
  const decimals = decimalsFor(m.uncertainty);
  if (!(m.uncertainty > 0)) return `${m.value.toFixed(decimals)} ${m.unit}`;
  return `${m.value.toFixed(decimals)} ± ${m.uncertainty.toFixed(decimals)} ${m.unit}`;
}
