// @ts-check
// Night for the plots' shading: from the site's own light sensor where it reports (PAR), else from the sun's
// elevation at the site's position. DOM-free.
//
// Solar position: the low-precision formulas of the Astronomical Almanac (as printed in its "Low precision
// formulas for the Sun", good to about 0.01 degree between 1950 and 2050), which is all shading needs.
// Night is the sun below -0.833 degrees (the standard refraction and semi-diameter allowance for sunrise).

const RAD = Math.PI / 180;
/** Sun's centre below this elevation, degrees: after sunset (refraction 34' plus the half disc 16'). */
export const SUNSET_ELEVATION_DEG = -0.833;
/** PAR below this is night for the plots, umol m-2 s-1 (common practice: a few units at most after dusk). */
export const DARK_PAR_UMOL_M2_S = 5;

/**
 * Elevation of the sun's centre, degrees, at `ms` (UTC) seen from latitude/longitude (degrees, east positive).
 * @param {number} ms
 * @param {number} latDeg
 * @param {number} lonDeg
 */
export function solarElevationDeg(ms, latDeg, lonDeg) {
  const n = ms / 86_400_000 - 10_957.5; // days from J2000.0 (2000-01-01 12:00 UTC)
  const L = (280.46 + 0.9856474 * n) % 360;
  const g = ((357.528 + 0.9856003 * n) % 360) * RAD;
  const lambda = (L + 1.915 * Math.sin(g) + 0.02 * Math.sin(2 * g)) * RAD;
  const eps = (23.439 - 0.0000004 * n) * RAD;
  const ra = Math.atan2(Math.cos(eps) * Math.sin(lambda), Math.cos(lambda));
  const dec = Math.asin(Math.sin(eps) * Math.sin(lambda));
  const gmstH = (18.697374558 + 24.06570982441908 * n) % 24;
  const ha = (gmstH * 15 + lonDeg) * RAD - ra;
  const lat = latDeg * RAD;
  return Math.asin(Math.sin(lat) * Math.sin(dec) + Math.cos(lat) * Math.cos(dec) * Math.cos(ha)) / RAD;
}

/**
 * Night intervals [startMs, endMs] between fromMs and toMs from the sun (5-min steps, then refined to the
 * minute by bisection).
 * @param {number} fromMs
 * @param {number} toMs
 * @param {number} latDeg
 * @param {number} lonDeg
 * @returns {[number, number][]}
 */
export function nightsFromSun(fromMs, toMs, latDeg, lonDeg) {
  const step = 5 * 60_000;
  const dark = (/** @type {number} */ t) => solarElevationDeg(t, latDeg, lonDeg) < SUNSET_ELEVATION_DEG;
  const edge = (/** @type {number} */ a, /** @type {number} */ b) => {
    const da = dark(a);
    while (b - a > 60_000) {
      const m = (a + b) / 2;
      if (dark(m) === da) a = m;
      else b = m;
    }
    return Math.round((a + b) / 2);
  };
  /** @type {[number, number][]} */
  const out = [];
  let start = dark(fromMs) ? fromMs : null;
  let prev = fromMs;
  for (let t = fromMs + step; t <= toMs + step; t += step) {
    const tt = Math.min(t, toMs);
    const d = dark(tt);
    if (start === null && d) start = edge(prev, tt);
    else if (start !== null && !d) {
      out.push([start, edge(prev, tt)]);
      start = null;
    }
    prev = tt;
    if (tt === toMs) break;
  }
  if (start !== null) out.push([start, toMs]);
  return out;
}

/**
 * Night intervals from light records (PAR below DARK_PAR_UMOL_M2_S), only where the records cover the time:
 * a gap longer than `maxGapMs` ends an interval rather than bridging it.
 * @param {{t: string, par_umol_m2_s: number | null}[]} light sorted by t
 * @param {number} [maxGapMs]
 * @returns {{nights: [number, number][], covered: [number, number][]}}
 */
export function nightsFromPar(light, maxGapMs = 45 * 60_000) {
  /** @type {[number, number][]} */
  const nights = [];
  /** @type {[number, number][]} */
  const covered = [];
  /** @type {number | null} */
  let start = null;
  /** @type {number | null} */
  let coverStart = null;
  let prev = Number.NEGATIVE_INFINITY;
  for (const r of light) {
    const t = Date.parse(r.t);
    const v = r.par_umol_m2_s;
    if (!Number.isFinite(t) || typeof v !== 'number') continue;
    if (t - prev > maxGapMs) {
      if (start !== null) nights.push([start, prev]);
      if (coverStart !== null) covered.push([coverStart, prev]);
      start = null;
      coverStart = t;
    }
    const isDark = v < DARK_PAR_UMOL_M2_S;
    if (isDark && start === null) start = t;
    else if (!isDark && start !== null) {
      nights.push([start, t]);
      start = null;
    }
    prev = t;
  }
  if (start !== null) nights.push([start, prev]);
  if (coverStart !== null) covered.push([coverStart, prev]);
  return { nights, covered };
}

/**
 * The nights to shade between fromMs and toMs: measured (PAR) where the light records cover the time, the
 * sun's elsewhere.
 * @param {number} fromMs
 * @param {number} toMs
 * @param {{lat: number, lon: number} | null} where
 * @param {{t: string, par_umol_m2_s: number | null}[]} light
 * @returns {[number, number][]}
 */
export function nightIntervals(fromMs, toMs, where, light) {
  const par = nightsFromPar(light);
  /** @type {[number, number][]} */
  const out = par.nights.filter(([a, b]) => b > fromMs && a < toMs);
  if (where === null) return out;
  // The sun fills the stretches the light sensor does not cover.
  let cursor = fromMs;
  /** @type {[number, number][]} */
  const gaps = [];
  for (const [a, b] of par.covered) {
    if (b < fromMs || a > toMs) continue;
    if (a > cursor) gaps.push([cursor, Math.min(a, toMs)]);
    cursor = Math.max(cursor, b);
  }
  if (cursor < toMs) gaps.push([cursor, toMs]);
  for (const [a, b] of gaps) out.push(...nightsFromSun(a, b, where.lat, where.lon));
  return out.sort((x, y) => x[0] - y[0]);
}
