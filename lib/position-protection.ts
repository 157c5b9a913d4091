/**
 * Positions in the exports meant for the public. A wreck's exact position can invite looting,
 * so a campaign may round positions to a grid or leave them out; the find register for the
 * heritage authority always keeps them exact.
 */
import { geodesicInverse } from './geodesy';
import type { PublicPositionMode } from './schemas/exports';

export type PublicPosition = {
  lat: number;
  lon: number;
  /** Radius in metres around the given point that surely holds the true one; null when not known. */
  uncertaintyM: number | null;
};

/** The grid spacing in degrees of a mode, or null for exact and withheld. */
export function gridStep(mode: PublicPositionMode): number | null {
  if (mode === 'grid-0.01') return 0.01;
  if (mode === 'grid-0.1') return 0.1;
  return null;
}

const decimalsOf = (step: number) => Math.max(0, Math.round(-Math.log10(step)));

/** `value` rounded to the nearest multiple of `step`, written without floating-point dust. */
export function snapToGrid(value: number, step: number): number {
  const snapped = Number((Math.round(value / step) * step).toFixed(decimalsOf(step)));
  return Object.is(snapped, -0) ? 0 : snapped;
}

/**
 * Distance in metres from a grid point to the farthest corner of its cell (a square of `step`
 * degrees centred on it): every position that rounds to the point lies within it.
 */
export function cellRadiusM(lat: number, lon: number, step: number): number {
  // The cell's shape depends only on its latitude and size, and exports ask for the same few cells
  // over and over, so each is measured once.
  const key = `${lat}/${step}`;
  const known = radiusCache.get(key);
  if (known !== undefined) return known;
  const radius = farthestCorner(lat, lon, step);
  if (radiusCache.size > 10_000) radiusCache.clear();
  radiusCache.set(key, radius);
  return radius;
}

const radiusCache = new Map<string, number>();

function farthestCorner(lat: number, lon: number, step: number): number {
  const half = step / 2;
  let far = 0;
  for (const dLat of [-half, half]) {
    for (const dLon of [-half, half]) {
      const cornerLat = Math.max(-90, Math.min(90, lat + dLat));
      far = Math.max(far, geodesicInverse(lat, lon, cornerLat, lon + dLon).distanceM);
    }
  }
  return far;
}

/**
 * The position as a public export shows it under `mode`: unchanged, rounded to the grid with the
 * uncertainty widened to cover the whole cell (and any uncertainty it had), or null (withheld).
 */
export function publicPosition(
  position: { lat: number; lon: number; uncertaintyM?: number | null },
  mode: PublicPositionMode,
): PublicPosition | null {
  if (mode === 'withheld') return null;
  const step = gridStep(mode);
  if (step === null) return { lat: position.lat, lon: position.lon, uncertaintyM: position.uncertaintyM ?? null };
  const lat = snapToGrid(position.lat, step);
  const lon = snapToGrid(position.lon, step);
  return { lat, lon, uncertaintyM: Math.ceil(cellRadiusM(lat, lon, step) + (position.uncertaintyM ?? 0)) };
}

/** A bounding box grown outward to whole grid cells, so it says no more than the rounded positions. */
export function publicBox(
  box: { south: number; north: number; west: number; east: number },
  mode: PublicPositionMode,
): { south: number; north: number; west: number; east: number } | null {
  if (mode === 'withheld') return null;
  const step = gridStep(mode);
  if (step === null) return box;
  const d = decimalsOf(step);
  const fix = (v: number) => Number(v.toFixed(d + 1));
  return {
    south: fix(Math.max(-90, snapToGrid(box.south, step) - step / 2)),
    north: fix(Math.min(90, snapToGrid(box.north, step) + step / 2)),
    west: fix(Math.max(-180, snapToGrid(box.west, step) - step / 2)),
    east: fix(Math.min(180, snapToGrid(box.east, step) + step / 2)),
  };
}

/** What a public file says about its positions, for Darwin Core's dataGeneralizations / informationWithheld. */
export function positionStatement(mode: PublicPositionMode): { dataGeneralizations: string; informationWithheld: string } {
  const step = gridStep(mode);
  if (step !== null) {
    return {
      dataGeneralizations: `Position rounded to the nearest ${step}° of latitude and longitude to protect an underwater heritage site; coordinateUncertaintyInMeters covers the whole grid cell.`,
      informationWithheld: '',
    };
  }
  if (mode === 'withheld') {
    return {
      dataGeneralizations: '',
      informationWithheld: 'Position withheld to protect an underwater heritage site; the campaign lead may share it on request.',
    };
  }
  return { dataGeneralizations: '', informationWithheld: '' };
}
