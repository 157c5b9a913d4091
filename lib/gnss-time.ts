/**
 * GPS time ↔ UTC.
 *
 * GPS time has counted uniformly since 1980-01-06 00:00:00 UTC and so runs
 * ahead of UTC by every leap second inserted since then: 18 s since
 * 2017-01-01. Vehicle navigation computers often log GPS time as if it were
 * UTC; {@link gpsToUtcMs} removes the offset.
 *
 * Times here are "ms since 1970-01-01 on the given time scale": a GPS reading
 * of 2017-01-01T00:00:18 is `Date.UTC(2017, 0, 1, 0, 0, 18)` in, and
 * `Date.UTC(2017, 0, 1)` UTC out. The table holds every leap second announced
 * in IERS Bulletin C up to the 2025 bulletins (none since 2017-01-01); a new
 * one needs a new row.
 */

/** Instants at which GPS − UTC grew, as [UTC ms of 00:00:00 after the leap second, GPS − UTC in s from then]. */
const LEAP_TABLE: ReadonlyArray<readonly [number, number]> = [
  [Date.UTC(1981, 6, 1), 1],
  [Date.UTC(1982, 6, 1), 2],
  [Date.UTC(1983, 6, 1), 3],
  [Date.UTC(1985, 6, 1), 4],
  [Date.UTC(1988, 0, 1), 5],
  [Date.UTC(1990, 0, 1), 6],
  [Date.UTC(1991, 0, 1), 7],
  [Date.UTC(1992, 6, 1), 8],
  [Date.UTC(1993, 6, 1), 9],
  [Date.UTC(1994, 6, 1), 10],
  [Date.UTC(1996, 0, 1), 11],
  [Date.UTC(1997, 6, 1), 12],
  [Date.UTC(1999, 0, 1), 13],
  [Date.UTC(2006, 0, 1), 14],
  [Date.UTC(2009, 0, 1), 15],
  [Date.UTC(2012, 6, 1), 16],
  [Date.UTC(2015, 6, 1), 17],
  [Date.UTC(2017, 0, 1), 18],
];

/** Start of GPS time, 1980-01-06 00:00:00 UTC, in ms since epoch. */
export const GPS_EPOCH_MS = Date.UTC(1980, 0, 6);

/**
 * GPS − UTC in whole seconds at a UTC instant; 0 before the first leap
 * second after the GPS epoch (including instants before GPS time began).
 *
 * @param utcMs ms since epoch UTC
 */
export function gpsUtcOffsetSeconds(utcMs: number): number {
  let offset = 0;
  for (const [fromUtcMs, seconds] of LEAP_TABLE) {
    if (utcMs >= fromUtcMs) offset = seconds;
    else break;
  }
  return offset;
}

/**
 * UTC from a GPS time reading.
 *
 * During an inserted leap second (23:59:60 UTC), which ms since epoch cannot
 * express, the result repeats the first second of the next day, as POSIX time
 * does.
 *
 * @param gpsMs GPS time as ms since 1970-01-01 on the GPS scale
 * @returns ms since epoch UTC, or NaN for non-finite input
 */
export function gpsToUtcMs(gpsMs: number): number {
  if (!Number.isFinite(gpsMs)) return Number.NaN;
  let offset = 0;
  for (const [fromUtcMs, seconds] of LEAP_TABLE) {
    // Compared on the GPS scale: the new offset holds from the GPS reading of
    // 00:00:00 UTC after the leap second; the leap second itself, one second
    // earlier on the GPS clock, still takes the old offset
    if (gpsMs >= fromUtcMs + seconds * 1000) offset = seconds;
    else break;
  }
  return gpsMs - offset * 1000;
}

/**
 * GPS time reading at a UTC instant.
 *
 * @param utcMs ms since epoch UTC
 * @returns GPS time as ms since 1970-01-01 on the GPS scale, or NaN for non-finite input
 */
export function utcToGpsMs(utcMs: number): number {
  if (!Number.isFinite(utcMs)) return Number.NaN;
  return utcMs + gpsUtcOffsetSeconds(utcMs) * 1000;
}
