/**
 * Pressure ↔ depth conversions for sea water.
 *
 * Both conversions assume the "standard ocean" of the references (salinity 35,
 * temperature 0 °C); in real water columns the error is a metre or two at full
 * ocean depth, far below the precision a dive log needs.
 *
 * Invalid input (non-finite numbers, latitude outside ±90°) yields `NaN` rather
 * than throwing, so a column of telemetry can be mapped without try/catch and
 * the caller filters with `Number.isFinite`.
 */

/** One standard atmosphere in decibar (101 325 Pa). */
export const STANDARD_ATMOSPHERE_DBAR = 10.1325;

const DEG_TO_RAD = Math.PI / 180;

function validLatitude(latitudeDeg: number): boolean {
  return Number.isFinite(latitudeDeg) && Math.abs(latitudeDeg) <= 90;
}

/**
 * Depth in metres below the sea surface from sea pressure, by the UNESCO 1983
 * algorithm (Fofonoff & Millard 1983, UNESCO Technical Papers in Marine
 * Science 44, "DEPTH"), which includes the variation of gravity with latitude
 * and pressure.
 *
 * @param pressureDbar sea pressure in dbar (absolute pressure minus one atmosphere)
 * @param latitudeDeg latitude in degrees, −90..90
 * @returns depth in metres (positive down), or NaN for invalid input
 */
export function depthFromPressure(pressureDbar: number, latitudeDeg: number): number {
  if (!Number.isFinite(pressureDbar) || !validLatitude(latitudeDeg)) return Number.NaN;
  const p = pressureDbar;
  const x = Math.sin(latitudeDeg * DEG_TO_RAD) ** 2;
  const gravity = 9.780318 * (1.0 + (5.2788e-3 + 2.36e-5 * x) * x) + 1.092e-6 * p;
  const geopotential = (((-1.82e-15 * p + 2.279e-10) * p - 2.2512e-5) * p + 9.72659) * p;
  return geopotential / gravity;
}

/**
 * Sea pressure in dbar at a depth, by Saunders (1981), "Practical conversion
 * of pressure to depth", J. Phys. Oceanogr. 11, 573–574:
 * z = (1 − c1)·p − c2·p², c1 = (5.92 + 5.25·sin²φ)·10⁻³, c2 = 2.21·10⁻⁶,
 * solved for p.
 *
 * This is a quadratic fit, not the exact inverse of {@link depthFromPressure}:
 * the two disagree by up to about 0.07 % of the pressure at full ocean depth.
 *
 * @param depthM depth in metres (positive down)
 * @param latitudeDeg latitude in degrees, −90..90
 * @returns sea pressure in dbar, or NaN for invalid input or depths beyond the
 *   fit's range (where the quadratic has no real root)
 */
export function pressureFromDepth(depthM: number, latitudeDeg: number): number {
  if (!Number.isFinite(depthM) || !validLatitude(latitudeDeg)) return Number.NaN;
  const s = Math.sin(Math.abs(latitudeDeg) * DEG_TO_RAD);
  const c1 = 5.92e-3 + s * s * 5.25e-3;
  const c2 = 2.21e-6;
  const b = 1 - c1;
  const discriminant = b * b - 4 * c2 * depthM;
  if (discriminant < 0) return Number.NaN;
  // The textbook root (b − √D)/(2·c2) subtracts two nearly equal numbers; this
  // rationalised form gives the same root without the loss of precision.
  return (2 * depthM) / (b + Math.sqrt(discriminant));
}

/**
 * Sea pressure from absolute pressure, as logged by sensors that do not vent to
 * the atmosphere.
 *
 * @param absDbar absolute pressure in dbar
 * @returns sea pressure in dbar (absolute minus one standard atmosphere), or
 *   NaN for non-finite input
 */
export function seaPressureFromAbsolute(absDbar: number): number {
  if (!Number.isFinite(absDbar)) return Number.NaN;
  return absDbar - STANDARD_ATMOSPHERE_DBAR;
}
