import type { Db } from '../../../db/client';
import { telemetryValuesAt } from '../telemetry';

type Typed = {
  depth?: number | null;
  lat?: number | null;
  lon?: number | null;
  temperature?: number | null;
  heading?: number | null;
  altitude?: number | null;
};

/**
 * The depth, position, temperature, heading and altitude an entry takes: what the person typed is `manual`;
 * what they left empty comes from the telemetry log at that instant, when the log has a value.
 */
export function stampValues(db: Db, diveId: string, at: Date, typed: Typed) {
  const fromLog =
    typed.depth == null || typed.lat == null || typed.temperature == null || typed.heading == null || typed.altitude == null
      ? telemetryValuesAt(db, diveId, at.getTime())
      : null;
  const pick = (manual: number | null | undefined, logged: number | null | undefined) =>
    manual != null
      ? { value: manual, source: 'manual' as const }
      : logged != null
        ? { value: logged, source: 'telemetry' as const }
        : { value: null, source: null };
  const depth = pick(typed.depth, fromLog?.depth);
  const hasPosition = typed.lat != null && typed.lon != null;
  const loggedPosition = fromLog?.lat != null && fromLog.lon != null;
  const temperature = pick(typed.temperature, fromLog?.temperature);
  const heading = pick(typed.heading, fromLog?.heading);
  const altitude = pick(typed.altitude, fromLog?.altitude);
  return {
    depth: depth.value,
    depthSource: depth.source,
    lat: hasPosition ? typed.lat! : loggedPosition ? fromLog.lat : null,
    lon: hasPosition ? typed.lon! : loggedPosition ? fromLog.lon : null,
    positionSource: hasPosition ? ('manual' as const) : loggedPosition ? ('telemetry' as const) : null,
    temperature: temperature.value,
    temperatureSource: temperature.source,
    heading: heading.value,
    headingSource: heading.source,
    altitude: altitude.value,
    altitudeSource: altitude.source,
  };
}
