// Position of the sun and the times it rises and sets (docs/methods/daily.md 10.5): the low-accuracy solar
// coordinates of Meeus (1998, Astronomical Algorithms, 2nd ed., ch. 25: about 0.01 deg) and the mean sidereal
// time of ch. 12, so day and night are known where no PAR sensor reports. Rise and set are the instants the
// centre of the disc passes -0.833 deg (0.567 deg of refraction plus the 0.266 deg semidiameter, common
// practice); civil dusk and dawn use -6 deg.
const DEG = Math.PI / 180;
const norm360 = (x: number) => ((x % 360) + 360) % 360;

/** Julian day of an instant (ms since 1970-01-01 UTC; UT taken for TT, a difference of about a minute). */
export function julianDay(tMs: number): number {
  return tMs / 86_400_000 + 2440587.5;
}

/** Apparent right ascension and declination of the sun (deg) at Julian day jd. Check: Meeus example 25.a,
 * 1992 Oct 13.0 (JD 2448908.5) gives RA 198.38083 deg and declination -7.78507 deg (from memory). */
export function solarCoordinates(jd: number): { raDeg: number; decDeg: number; lambdaDeg: number } {
  const T = (jd - 2451545) / 36525;
  const L0 = 280.46646 + T * (36000.76983 + 0.0003032 * T);
  const M = (357.52911 + T * (35999.05029 - 0.0001537 * T)) * DEG;
  const C =
    Math.sin(M) * (1.914602 - T * (0.004817 + 0.000014 * T)) +
    Math.sin(2 * M) * (0.019993 - 0.000101 * T) +
    Math.sin(3 * M) * 0.000289;
  const omega = (125.04 - 1934.136 * T) * DEG;
  const lambda = (L0 + C - 0.00569 - 0.00478 * Math.sin(omega)) * DEG;
  const eps0 = 23 + (26 + (21.448 - T * (46.815 + T * (0.00059 - T * 0.001813))) / 60) / 60;
  const eps = (eps0 + 0.00256 * Math.cos(omega)) * DEG;
  const ra = Math.atan2(Math.cos(eps) * Math.sin(lambda), Math.cos(lambda));
  const dec = Math.asin(Math.sin(eps) * Math.sin(lambda));
  return { raDeg: norm360(ra / DEG), decDeg: dec / DEG, lambdaDeg: norm360(lambda / DEG) };
}

/** Mean sidereal time at Greenwich, deg (Meeus eq. 12.4). Check: Meeus example 12.b, 1987 Apr 10 19:21:00
 * UT gives 128.7378734 deg (from memory). */
export function greenwichSiderealDeg(jd: number): number {
  const T = (jd - 2451545) / 36525;
  return norm360(
    280.46061837 + 360.98564736629 * (jd - 2451545) + 0.000387933 * T * T - (T * T * T) / 38710000,
  );
}

/** Geometric elevation of the sun's centre above the horizon, deg (no refraction), at latitude latDeg
 * (north positive) and longitude lonDeg (east positive). */
export function solarElevationDeg(tMs: number, latDeg: number, lonDeg: number): number {
  const jd = julianDay(tMs);
  const { raDeg, decDeg } = solarCoordinates(jd);
  const h = (greenwichSiderealDeg(jd) + lonDeg - raDeg) * DEG;
  const phi = latDeg * DEG;
  const d = decDeg * DEG;
  return Math.asin(Math.sin(phi) * Math.sin(d) + Math.cos(phi) * Math.cos(d) * Math.cos(h)) / DEG;
}

/** Altitudes of the sun's centre that define the events (deg). */
export const SUNRISE_ALTITUDE_DEG = -0.833;
export const CIVIL_TWILIGHT_ALTITUDE_DEG = -6;

export interface SunEvent {
  tMs: number;
  kind: 'rise' | 'set';
}

/** Times in [fromMs, toMs) at which the sun's centre crosses altitudeDeg going up (rise) or down (set),
 * to 1 s: a 10-minute scan, then bisection. None on polar days and nights. */
export function sunEvents(
  fromMs: number,
  toMs: number,
  latDeg: number,
  lonDeg: number,
  altitudeDeg = SUNRISE_ALTITUDE_DEG,
): SunEvent[] {
  const step = 600_000;
  const f = (t: number) => solarElevationDeg(t, latDeg, lonDeg) - altitudeDeg;
  const out: SunEvent[] = [];
  let t0 = fromMs;
  let f0 = f(t0);
  while (t0 < toMs) {
    const t1 = Math.min(t0 + step, toMs);
    const f1 = f(t1);
    if ((f0 < 0 && f1 >= 0) || (f0 >= 0 && f1 < 0)) {
      let lo = t0;
      let hi = t1;
      const rising = f0 < 0;
      while (hi - lo > 1000) {
        const mid = (lo + hi) / 2;
        if (f(mid) < 0 === rising) lo = mid;
        else hi = mid;
      }
      const t = Math.round((lo + hi) / 2);
      if (t >= fromMs && t < toMs) out.push({ tMs: t, kind: rising ? 'rise' : 'set' });
    }
    t0 = t1;
    f0 = f1;
  }
  return out;
}

/** The first sunrise after tMs within 36 h, or undefined (polar night or day). */
export function nextSunrise(tMs: number, latDeg: number, lonDeg: number, altitudeDeg = SUNRISE_ALTITUDE_DEG) {
  return sunEvents(tMs, tMs + 36 * 3_600_000, latDeg, lonDeg, altitudeDeg).find((e) => e.kind === 'rise')
    ?.tMs;
}

/** True when the sun's centre is below altitudeDeg (night by the sun). */
export function isSunDown(
  tMs: number,
  latDeg: number,
  lonDeg: number,
  altitudeDeg = SUNRISE_ALTITUDE_DEG,
): boolean {
  return solarElevationDeg(tMs, latDeg, lonDeg) < altitudeDeg;
}
