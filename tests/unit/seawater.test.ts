import { describe, expect, it } from 'vitest';
import { STANDARD_ATMOSPHERE_DBAR, depthFromPressure, pressureFromDepth, seaPressureFromAbsolute } from '../../lib/seawater';

describe('depthFromPressure (UNESCO 1983)', () => {
  it('matches the published check value at 10000 dbar, 30°', () => {
    // Fofonoff & Millard 1983, UNESCO Tech. Pap. Mar. Sci. 44, DEPTH check value: 9712.653 m
    expect(Math.abs(depthFromPressure(10000, 30) - 9712.653)).toBeLessThan(1e-3);
  });

  it('is symmetric in latitude', () => {
    expect(depthFromPressure(4000, -52)).toBe(depthFromPressure(4000, 52));
  });

  it('gives about one metre per dbar near the surface', () => {
    // Rule of thumb (common practice): 1 dbar ≈ 1 m of sea water
    const d = depthFromPressure(10, 45);
    expect(d).toBeGreaterThan(9.8);
    expect(d).toBeLessThan(10);
  });

  it('gives a depth 0.8–1.3 % less than the pressure at 1000 dbar at mid latitudes', () => {
    // Rule of thumb (common practice, from memory): depth is 0.8–1.3 % less
    // than pressure in dbar at 1000 dbar, the spread coming from latitude
    for (let lat = 10; lat <= 80; lat += 5) {
      const shortfall = 1 - depthFromPressure(1000, lat) / 1000;
      expect(shortfall).toBeGreaterThanOrEqual(0.008);
      expect(shortfall).toBeLessThanOrEqual(0.013);
    }
  });

  it('gives a larger depth at the equator than at the pole for the same pressure', () => {
    // Gravity increases towards the poles (Fofonoff & Millard 1983, gravity term of DEPTH)
    expect(depthFromPressure(5000, 0)).toBeGreaterThan(depthFromPressure(5000, 90));
  });

  it('returns 0 at zero sea pressure', () => {
    // The DEPTH polynomial has no constant term (Fofonoff & Millard 1983; computed by hand)
    expect(depthFromPressure(0, 30)).toBe(0);
  });

  it('returns NaN for non-finite input or an impossible latitude', () => {
    expect(depthFromPressure(Number.NaN, 30)).toBeNaN();
    expect(depthFromPressure(Number.POSITIVE_INFINITY, 30)).toBeNaN();
    expect(depthFromPressure(100, Number.NaN)).toBeNaN();
    expect(depthFromPressure(100, 90.5)).toBeNaN();
  });
});

describe('pressureFromDepth (Saunders 1981)', () => {
  it('matches the published check value at 7321.45 m, 30°', () => {
    // Saunders 1981, J. Phys. Oceanogr. 11, 573–574; check value 7500.004 dbar as
    // given with R. Millard's 1983 single-precision coding of the formula.
    // Double precision gives 7500.0065: the published figure carries float32
    // rounding in (1 − c1) − √(…), so the tolerance is 0.003 dbar.
    expect(Math.abs(pressureFromDepth(7321.45, 30) - 7500.004)).toBeLessThanOrEqual(0.003);
  });

  it('round-trips with depthFromPressure to within 0.3 m down to 4000 m', () => {
    // Saunders' quadratic is a fit, not the inverse of the UNESCO polynomial;
    // 0.3 m is the largest difference measured over 0–4000 m, all latitudes.
    for (let z = 0; z <= 4000; z += 50) {
      for (let lat = -90; lat <= 90; lat += 15) {
        const back = depthFromPressure(pressureFromDepth(z, lat), lat);
        expect(Math.abs(back - z)).toBeLessThanOrEqual(0.3);
      }
    }
  });

  it('round-trips with depthFromPressure to within 0.12 % down to 11000 m', () => {
    // Measured worst case: 0.108 % at 11000 m at the poles, where the fit is poorest
    for (let z = 100; z <= 11000; z += 100) {
      for (let lat = -90; lat <= 90; lat += 15) {
        const back = depthFromPressure(pressureFromDepth(z, lat), lat);
        expect(Math.abs(back - z) / z).toBeLessThanOrEqual(0.0012);
      }
    }
  });

  it('returns NaN for non-finite input or an impossible latitude', () => {
    expect(pressureFromDepth(Number.NaN, 30)).toBeNaN();
    expect(pressureFromDepth(100, Number.NEGATIVE_INFINITY)).toBeNaN();
    expect(pressureFromDepth(100, -91)).toBeNaN();
  });
});

describe('seaPressureFromAbsolute', () => {
  it('subtracts one standard atmosphere', () => {
    // One standard atmosphere = 101 325 Pa = 10.1325 dbar (common practice)
    expect(STANDARD_ATMOSPHERE_DBAR).toBe(10.1325);
    expect(seaPressureFromAbsolute(10.1325)).toBe(0);
    expect(seaPressureFromAbsolute(1010.1325)).toBeCloseTo(1000, 10);
  });

  it('returns NaN for non-finite input', () => {
    expect(seaPressureFromAbsolute(Number.NaN)).toBeNaN();
    expect(seaPressureFromAbsolute(Number.POSITIVE_INFINITY)).toBeNaN();
  });
});
