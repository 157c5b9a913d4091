import { describe, expect, it } from 'vitest';
import { GPS_EPOCH_MS, gpsToUtcMs, gpsUtcOffsetSeconds, utcToGpsMs } from '../../lib/gnss-time';

// Offsets: TAI − UTC from the IERS leap-seconds.list (updated through IERS
// Bulletin C; copy distributed with tzdata, expiring 28 June 2026): 36 s from
// 2015-07-01, 37 s from 2017-01-01; GPS − UTC = (TAI − UTC) − 19 s, GPS time
// being TAI − 19 s (common practice).

describe('gpsUtcOffsetSeconds', () => {
  it('is 18 s from 2017-01-01 and 17 s just before', () => {
    expect(gpsUtcOffsetSeconds(Date.UTC(2017, 0, 1))).toBe(18);
    expect(gpsUtcOffsetSeconds(Date.UTC(2016, 11, 31, 23, 59, 59, 999))).toBe(17);
    expect(gpsUtcOffsetSeconds(Date.UTC(2024, 6, 15))).toBe(18);
  });

  it('is 17 s from 2015-07-01 and 16 s just before', () => {
    expect(gpsUtcOffsetSeconds(Date.UTC(2015, 6, 1))).toBe(17);
    expect(gpsUtcOffsetSeconds(Date.UTC(2015, 5, 30, 23, 59, 59))).toBe(16);
  });

  it('is 0 at the GPS epoch and 6 s in mid-1990', () => {
    // TAI − UTC 19 s from 1980-01-01, 25 s from 1990-01-01 (IERS leap-seconds.list)
    expect(gpsUtcOffsetSeconds(GPS_EPOCH_MS)).toBe(0);
    expect(gpsUtcOffsetSeconds(Date.UTC(1990, 5, 1))).toBe(6);
  });
});

describe('gpsToUtcMs', () => {
  it('removes 18 s after 2017-01-01', () => {
    expect(gpsToUtcMs(Date.UTC(2017, 0, 1, 0, 0, 18))).toBe(Date.UTC(2017, 0, 1));
    expect(gpsToUtcMs(Date.UTC(2023, 3, 5, 12, 0, 18, 250))).toBe(Date.UTC(2023, 3, 5, 12, 0, 0, 250));
  });

  it('removes 17 s just before 2017-01-01', () => {
    expect(gpsToUtcMs(Date.UTC(2017, 0, 1, 0, 0, 16))).toBe(Date.UTC(2016, 11, 31, 23, 59, 59));
  });

  it('maps the 2016-12-31 leap second onto the first second of 2017', () => {
    // The GPS clock reads 00:00:17.5 during 23:59:60.5 UTC
    expect(gpsToUtcMs(Date.UTC(2017, 0, 1, 0, 0, 17, 500))).toBe(Date.UTC(2017, 0, 1, 0, 0, 0, 500));
  });

  it('removes 17 s after 2015-07-01 and 16 s before', () => {
    expect(gpsToUtcMs(Date.UTC(2015, 6, 1, 0, 0, 17))).toBe(Date.UTC(2015, 6, 1));
    expect(gpsToUtcMs(Date.UTC(2015, 6, 1, 0, 0, 15))).toBe(Date.UTC(2015, 5, 30, 23, 59, 59));
  });

  it('is the identity at the GPS epoch', () => {
    expect(gpsToUtcMs(GPS_EPOCH_MS)).toBe(GPS_EPOCH_MS);
  });

  it('returns NaN for non-finite input', () => {
    expect(gpsToUtcMs(Number.NaN)).toBeNaN();
    expect(utcToGpsMs(Number.POSITIVE_INFINITY)).toBeNaN();
  });

  it('inverts utcToGpsMs outside leap seconds', () => {
    for (let t = GPS_EPOCH_MS; t < Date.UTC(2030, 0, 1); t += 86_400_000 * 13 + 3_333_333) {
      expect(gpsToUtcMs(utcToGpsMs(t))).toBe(t);
    }
    expect(gpsToUtcMs(utcToGpsMs(Date.UTC(2017, 0, 1)))).toBe(Date.UTC(2017, 0, 1));
    expect(gpsToUtcMs(utcToGpsMs(Date.UTC(2016, 11, 31, 23, 59, 59, 999)))).toBe(Date.UTC(2016, 11, 31, 23, 59, 59, 999));
  });
});
