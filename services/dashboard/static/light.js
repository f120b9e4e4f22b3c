// @ts-check
// The light response of a transect: its valid flux windows' NCP (or NEC) against their PAR, and the curve the
// processor fitted for a local day (the `daily` record; libs/daily light-response.ts, docs/methods/daily.md
// 10.2): NCP = Pmax tanh(I/Ik) - R and NEC = Gmax tanh(I/Ik) + G0. DOM-free: the columns uPlot draws.
import { decimals, num, unitText } from './format.js';
import { lowerBound } from './series.js';

/** @typedef {import('./types.js').Rec} Rec */

/**
 * The two responses: the flux field plotted, its sigma, and the daily record's curve parameters.
 * @typedef {{
 *   name: string, rate: string, sigma: string, amp: string, ik: string, intercept: string, sign: -1 | 1,
 *   ampName: string, interceptName: string
 * }} Response
 */

/** @type {{ncp: Response, nec: Response}} */
export const RESPONSES = {
  ncp: {
    name: 'NCP',
    rate: 'ncp_mmol_m2_h',
    sigma: 'ncp_sigma_mmol_m2_h',
    amp: 'pmax_mmol_m2_h',
    ik: 'ik_umol_m2_s',
    intercept: 'r_fit_mmol_m2_h',
    sign: -1,
    ampName: 'Pmax',
    interceptName: 'R',
  },
  nec: {
    name: 'NEC',
    rate: 'nec_mmol_m2_h',
    sigma: 'nec_sigma_mmol_m2_h',
    amp: 'gmax_mmol_m2_h',
    ik: 'ik_nec_umol_m2_s',
    intercept: 'g0_mmol_m2_h',
    sign: 1,
    ampName: 'Gmax',
    interceptName: 'G0',
  },
};

/** @typedef {keyof typeof RESPONSES} ResponseKind */

/** @typedef {{amp: number, ik: number, intercept: number, sign: -1 | 1}} Curve */

/** @param {unknown} v */
const finite = (v) => typeof v === 'number' && Number.isFinite(v);

/**
 * The fitted curve a daily record carries for a response, or null when the fit was refused or is missing.
 * @param {Rec} daily
 * @param {ResponseKind} kind
 * @returns {Curve | null}
 */
export function curveOf(daily, kind) {
  const r = RESPONSES[kind];
  const amp = daily[r.amp];
  const ik = daily[r.ik];
  const intercept = daily[r.intercept];
  if (!finite(amp) || !finite(ik) || !finite(intercept) || /** @type {number} */ (ik) <= 0) return null;
  return {
    amp: /** @type {number} */ (amp),
    ik: /** @type {number} */ (ik),
    intercept: /** @type {number} */ (intercept),
    sign: r.sign,
  };
}

/**
 * The curve's rate at PAR I (umol m-2 s-1; negative PAR is dark).
 * @param {Curve} c
 * @param {number} parUmolM2S
 */
export function curveValue(c, parUmolM2S) {
  return c.amp * Math.tanh(Math.max(0, parUmolM2S) / c.ik) + c.sign * c.intercept;
}

/**
 * The newest daily record of a transect with a fitted production curve (a day whose fit was refused has
 * none to draw).
 * @param {readonly Rec[]} days in time order
 * @returns {Rec | null}
 */
export function latestFit(days) {
  for (let i = days.length - 1; i >= 0; i--) {
    const d = /** @type {Rec} */ (days[i]);
    if (curveOf(d, 'ncp')) return d;
  }
  return null;
}

/**
 * The local day a daily record covers: from its `t` (the start of the day) for its `day_hours` (23, 24 or 25
 * at a change of summer time; 24 when the record does not say).
 * @param {Rec} daily
 */
export function dayBounds(daily) {
  const fromMs = Date.parse(daily.t);
  const hours = finite(daily.day_hours) ? /** @type {number} */ (daily.day_hours) : 24;
  return { fromMs, toMs: fromMs + hours * 3_600_000 };
}

/**
 * @typedef {{par: number, rate: number, sigma: number | null, tMs: number, ofDay: boolean, rec: Rec}} LightPoint
 * @typedef {{
 *   xs: number[], day: (number | null)[], other: (number | null)[], curve: (number | null)[],
 *   rows: (LightPoint | null)[], points: LightPoint[], dayCount: number, otherCount: number,
 *   lastMs: number | null, curveParams: Curve | null
 * }} LightColumns
 */

/**
 * The windows and the curve as uPlot's aligned columns, PAR ascending: one row per valid window with a PAR
 * and a rate (the fitted day's in `day`, the others in `other`), and rows of the curve alone on an even grid
 * of PAR from dark to the brightest window, so the curve is smooth. Windows are those of the range shown and
 * those of the fitted day.
 * @param {{t: number[], r: Rec[]}} flux the transect's windows, in time order
 * @param {Rec | null} daily the record of the fitted day
 * @param {ResponseKind} kind
 * @param {{fromMs: number, toMs: number}} range
 * @param {number} [gridN] points of the curve's grid
 * @returns {LightColumns}
 */
export function lightColumns(flux, daily, kind, range, gridN = 64) {
  const r = RESPONSES[kind];
  const curve = daily ? curveOf(daily, kind) : null;
  const day = daily ? dayBounds(daily) : null;
  /** @type {LightPoint[]} */
  const points = [];
  const take = (/** @type {number} */ lo, /** @type {number} */ hi) => {
    for (let j = lo; j < hi; j++) {
      const rec = /** @type {Rec} */ (flux.r[j]);
      const tMs = /** @type {number} */ (flux.t[j]);
      const par = rec.par_umol_m2_s;
      const rate = rec[r.rate];
      if (rec.valid !== true || !finite(par) || !finite(rate)) continue;
      const sigma = rec[r.sigma];
      points.push({
        par: /** @type {number} */ (par),
        rate: /** @type {number} */ (rate),
        sigma: finite(sigma) ? /** @type {number} */ (sigma) : null,
        tMs,
        ofDay: day !== null && tMs >= day.fromMs && tMs < day.toMs,
        rec,
      });
    }
  };
  // The range shown and the fitted day, each window once.
  const spans = [[range.fromMs, range.toMs]];
  if (day) spans.push([day.fromMs, day.toMs]);
  spans.sort((a, b) => /** @type {number} */ (a[0]) - /** @type {number} */ (b[0]));
  let doneTo = -Infinity;
  for (const [a, b] of /** @type {[number, number][]} */ (spans)) {
    const from = Math.max(a, doneTo);
    if (b > from) take(lowerBound(flux.t, from), lowerBound(flux.t, b));
    doneTo = Math.max(doneTo, b);
  }
  const maxPar = points.reduce((m, p) => Math.max(m, p.par), 0);
  /** @type {{x: number, p: LightPoint | null}[]} */
  const rows = points.map((p) => ({ x: p.par, p }));
  if (curve) {
    const top = maxPar > 0 ? maxPar * 1.05 : 3 * curve.ik;
    for (let i = 0; i < gridN; i++) rows.push({ x: (top * i) / (gridN - 1), p: null });
  }
  rows.sort((a, b) => a.x - b.x);
  const lastMs = points.reduce((m, p) => Math.max(m, p.tMs), -Infinity);
  const dayCount = points.filter((p) => p.ofDay).length;
  return {
    xs: rows.map((w) => w.x),
    day: rows.map((w) => (w.p && w.p.ofDay ? w.p.rate : null)),
    other: rows.map((w) => (w.p && !w.p.ofDay ? w.p.rate : null)),
    curve: rows.map((w) => (curve ? curveValue(curve, w.x) : null)),
    rows: rows.map((w) => w.p),
    points,
    dayCount,
    otherCount: points.length - dayCount,
    lastMs: Number.isFinite(lastMs) ? lastMs : null,
    curveParams: curve,
  };
}

/**
 * The window nearest to a position on the plot (in pixels, through `toPx`), within `maxPx`.
 * @param {readonly LightPoint[]} points
 * @param {(p: LightPoint) => {x: number, y: number}} toPx
 * @param {{x: number, y: number}} at
 * @param {number} maxPx
 * @returns {LightPoint | null}
 */
export function nearestPoint(points, toPx, at, maxPx) {
  let best = null;
  let bestD = maxPx * maxPx;
  for (const p of points) {
    const q = toPx(p);
    const d = (q.x - at.x) ** 2 + (q.y - at.y) ** 2;
    if (d <= bestD) {
      bestD = d;
      best = p;
    }
  }
  return best;
}

/**
 * The fitted curve in words with its parameters, their uncertainties and units (units from /api/site):
 * 'NCP = Pmax tanh(I/Ik) − R, fitted to the windows of 2026-02-28: Pmax 52.0 ± 3.1 mmol m⁻² h⁻¹, ...'.
 * @param {Rec} daily
 * @param {ResponseKind} kind
 * @param {Record<string, {unit: string}>} fields the daily record's fields as /api/site gives them
 */
export function fitSentence(daily, kind, fields) {
  const r = RESPONSES[kind];
  const c = curveOf(daily, kind);
  const day = String(daily.day ?? '');
  if (!c) return `No ${r.name} curve was fitted to the windows of ${day}.`;
  const part = (/** @type {string} */ name, /** @type {string} */ field, /** @type {number} */ v) => {
    const s = daily[`${field}_sigma`];
    const u = unitText(fields[field]?.unit ?? '');
    const sd = finite(s) ? ` ± ${/** @type {number} */ (s).toFixed(decimals(v))}` : '';
    return `${name} ${num(v)}${sd}${u ? ` ${u}` : ''}`;
  };
  return (
    `${r.name} = ${r.ampName} tanh(I/Ik) ${r.sign < 0 ? '−' : '+'} ${r.interceptName}, fitted to the windows ` +
    `of ${day}: ${[part(r.ampName, r.amp, c.amp), part('Ik', r.ik, c.ik), part(r.interceptName, r.intercept, c.intercept)].join(', ')}.`
  );
}
