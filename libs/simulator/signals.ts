// Forcing of the fictional reef as functions of time: tide, slowly varying offshore waves, wind, clouds,
// sunlight. Each random series is a sum of sinusoids with seeded periods and phases, so its value at any
// time is a pure function of (seed, time) and the series is smooth (no stepping state).
import type { Rng } from './prng.js';

const HOUR_S = 3600;
const DAY_S = 86400;

/** Principal semidiurnal lunar and solar constituents (periods in hours; Doodson's tables, common practice). */
export const M2_PERIOD_H = 12.4206012;
export const S2_PERIOD_H = 12.0;

/** A smooth random series: mean + sum_i a_i cos(2 pi t/T_i + phi_i), with T_i drawn between two periods. */
export interface SmoothSeries {
  at(tS: number): number;
}

export function smoothSeries(
  rng: Rng,
  mean: number,
  amplitude: number,
  minPeriodS: number,
  maxPeriodS: number,
  terms = 4,
): SmoothSeries {
  const periods: number[] = [];
  const phases: number[] = [];
  const amps: number[] = [];
  let norm = 0;
  for (let i = 0; i < terms; i++) {
    periods.push(minPeriodS * (maxPeriodS / minPeriodS) ** rng.next());
    phases.push(2 * Math.PI * rng.next());
    const a = 1 / (i + 1);
    amps.push(a);
    norm += a;
  }
  return {
    at(tS: number) {
      let s = 0;
      for (let i = 0; i < terms; i++) {
        s +=
          (amps[i] as number) * Math.cos((2 * Math.PI * tS) / (periods[i] as number) + (phases[i] as number));
      }
      return mean + (amplitude * s) / norm;
    },
  };
}

/** Still-water tide, m about mean sea level: M2 + S2 with a spring range of 2 (aM2 + aS2) ~ 1.0 m. */
export interface Tide {
  levelM(tS: number): number;
  /** d(level)/dt, m/s. */
  rateMS(tS: number): number;
}

export function createTide(rng: Rng, m2AmpM = 0.37, s2AmpM = 0.13): Tide {
  const phM2 = 2 * Math.PI * rng.next();
  const phS2 = 2 * Math.PI * rng.next();
  const wM2 = (2 * Math.PI) / (M2_PERIOD_H * HOUR_S);
  const wS2 = (2 * Math.PI) / (S2_PERIOD_H * HOUR_S);
  return {
    levelM: (t) => m2AmpM * Math.cos(wM2 * t + phM2) + s2AmpM * Math.cos(wS2 * t + phS2),
    rateMS: (t) => -m2AmpM * wM2 * Math.sin(wM2 * t + phM2) - s2AmpM * wS2 * Math.sin(wS2 * t + phS2),
  };
}

/**
 * Sine of the solar elevation (clipped at 0), from the declination (Cooper 1969, Sol. Energy 12, 333:
 * delta = 23.45 deg sin(2 pi (284 + doy)/365)) and the hour angle at local solar time (UTC + lon/15 h; the
 * equation of time, < 17 min, is neglected). Check: at the equator on an equinox, noon gives ~1 (common practice).
 */
export function sinSolarElevation(tMs: number, latDeg: number, lonDeg: number): number {
  const d = new Date(tMs);
  const startOfYear = Date.UTC(d.getUTCFullYear(), 0, 1);
  const doy = Math.floor((tMs - startOfYear) / (DAY_S * 1000)) + 1;
  const decl = ((23.45 * Math.PI) / 180) * Math.sin((2 * Math.PI * (284 + doy)) / 365);
  const solarHour = (((tMs / 3.6e6 + lonDeg / 15) % 24) + 24) % 24;
  const hourAngle = ((solarHour - 12) * 15 * Math.PI) / 180;
  const lat = (latDeg * Math.PI) / 180;
  const s = Math.sin(lat) * Math.sin(decl) + Math.cos(lat) * Math.cos(decl) * Math.cos(hourAngle);
  return Math.max(0, s);
}

/** Local solar hour 0-24. */
export function solarHour(tMs: number, lonDeg: number): number {
  return (((tMs / 3.6e6 + lonDeg / 15) % 24) + 24) % 24;
}

/** Clear-sky surface PAR, umol photons m-2 s-1: ~2200 at zenith sun, the tropical clear-sky noon value
 * (common practice), with an air-mass shape sin(e)^1.2. */
export function clearSkyParUmolM2S(sinElev: number): number {
  return sinElev <= 0 ? 0 : 2200 * sinElev ** 1.2;
}

/** Cloud transmission of PAR in (0.3, 1]: passing cumulus (20 min - 3 h) on top of overcast spells (days). */
export function createClouds(rng: Rng): { transmission(tS: number): number } {
  const fast = smoothSeries(rng.fork('fast'), 0, 1, 20 * 60, 3 * HOUR_S, 6);
  const slow = smoothSeries(rng.fork('slow'), 0, 1, 1.5 * DAY_S, 5 * DAY_S, 3);
  return {
    transmission(tS) {
      const cover = 1 / (1 + Math.exp(-(2.5 * fast.at(tS) + 2 * slow.at(tS) - 0.6)));
      return 1 - 0.65 * cover;
    },
  };
}
