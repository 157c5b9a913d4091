/**
 * Headings are angles on a circle (degrees clockwise from north, 0 ≤ h < 360): 359° and 1° are
 * 2° apart, and halfway between 350° and 10° is north, not 180°. Plain arithmetic on the numbers
 * would swing the vehicle the long way round every time it crosses north.
 */

/** A heading brought into [0, 360). */
export function wrapHeading(deg: number): number {
  const wrapped = deg - 360 * Math.floor(deg / 360);
  // A tiny negative input rounds up to exactly 360 in floating point.
  return wrapped === 360 ? 0 : wrapped;
}

/**
 * The signed smallest turn from heading `a` to heading `b`, in [−180, 180): positive clockwise.
 * Two opposite headings are a turn of −180° (either way is as short; one is chosen so the answer
 * does not depend on rounding).
 */
export function headingTurn(aDeg: number, bDeg: number): number {
  const d = bDeg - aDeg;
  return d - 360 * Math.floor((d + 180) / 360);
}

/** How far apart two headings are, in [0, 180]. */
export function headingDifference(aDeg: number, bDeg: number): number {
  return Math.abs(headingTurn(aDeg, bDeg));
}

/**
 * The heading a fraction `f` of the way from `a` to `b` (f = 0 gives a, f = 1 gives b), turning
 * the short way round, in [0, 360).
 */
export function interpolateHeading(aDeg: number, bDeg: number, f: number): number {
  return wrapHeading(aDeg + f * headingTurn(aDeg, bDeg));
}

/** A heading for reading, whole degrees with north as 000°: "007°", "—" when there is none. */
export function formatHeading(deg: number | null | undefined): string {
  if (deg == null || !Number.isFinite(deg)) return '—';
  // Rounding 359.6 gives 360, which on a compass is north.
  return `${String(Math.round(wrapHeading(deg)) % 360).padStart(3, '0')}°`;
}
