import { describe, expect, it } from 'vitest';
import { nightIntervals, nightsFromPar, nightsFromSun, solarElevationDeg } from './sun.js';

// The demo's fictional site: 8.01 N, 144.93 W.
const LAT = 8.01;
const LON = -144.93;
const MIN = 60_000;

describe('solar elevation and nights', () => {
  it('rises and sets where the equinox puts it', () => {
    // From memory: on 20 March the equation of time is about -7.5 min and near the equator the day lasts about
    // 12 h 6 min (refraction and the sun's half disc), so local noon at 144.93 W is about 21:47 UTC and the
    // sun rises about 15:44 UTC and sets about 03:50 UTC.
    const day = Date.UTC(2026, 2, 20);
    const nights = nightsFromSun(day, day + 36 * 3_600_000, LAT, LON);
    const sunrise = nights[0]![1];
    const sunset = nights[1]![0];
    expect(Math.abs(sunrise - (day + (15 * 60 + 44) * MIN))).toBeLessThan(6 * MIN);
    expect(Math.abs(sunset - (day + (27 * 60 + 50) * MIN))).toBeLessThan(6 * MIN);
    // Noon elevation: 90 - |latitude - declination| with the declination about 0 at the equinox.
    expect(solarElevationDeg(day + (21 * 60 + 47) * MIN, LAT, LON)).toBeCloseTo(90 - LAT, 0);
  });

  it('takes night from the light sensor where it reports, the sun elsewhere', () => {
    const t0 = Date.UTC(2026, 2, 1, 0); // 14:00 local the day before
    const light = [];
    // 10 h of PAR records every 5 min: light until 04:30 UTC, dark after (18:30 local: a shaded sensor).
    for (let i = 0; i <= 120; i++) {
      const t = t0 + i * 5 * MIN;
      light.push({ t: new Date(t).toISOString(), par_umol_m2_s: t < t0 + 270 * MIN ? 600 : 0.5 });
    }
    const par = nightsFromPar(light);
    expect(par.nights).toEqual([[t0 + 270 * MIN, t0 + 600 * MIN]]);
    const nights = nightIntervals(t0, t0 + 24 * 3_600_000, { lat: LAT, lon: LON }, light);
    // The measured dusk at 04:30 UTC, then the sun's night continues after the light records end at 10:00.
    expect(nights[0]).toEqual([t0 + 270 * MIN, t0 + 600 * MIN]);
    expect(nights[1]![0]).toBe(t0 + 600 * MIN);
    expect(nights[1]![1] - (t0 + 600 * MIN)).toBeGreaterThan(5 * 3_600_000); // dark until about sunrise, ~16 UTC
    expect(nights[1]![1] - (t0 + 600 * MIN)).toBeLessThan(7 * 3_600_000);
  });
});
