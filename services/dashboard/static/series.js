// @ts-check
// What the plots draw from the page's records (store.js). DOM-free: which quantities each station shows, and
// the columns, flag marks, gaps, limits and invalid flux windows of each plot, and the time range shown.
import { recordMetric } from './verdicts.js';

/** @typedef {import('./types.js').Rec} Rec */
/** @typedef {import('./types.js').SiteInfo} SiteInfo */
/** @typedef {import('./types.js').SiteRule} SiteRule */
/** @typedef {import('./store.js').RecordStore} RecordStore */

/**
 * What a station shows, in groups (presentation only: units and words come from /api/site). A quantity shows
 * when the station has a sensor that measures it or records of it exist.
 * @type {{group: string, items: {type: string, field: string, kinds: string[]}[]}[]}
 */
export const STATION_GROUPS = [
  {
    group: 'Oxygen and water',
    items: [
      { type: 'oxygen', field: 'o2_mg_l', kinds: ['oxygen'] },
      { type: 'oxygen', field: 'o2_sat_pct', kinds: ['oxygen'] },
      { type: 'carbonate', field: 'temp_c', kinds: ['pco2'] },
      { type: 'carbonate', field: 'sal', kinds: ['pco2'] },
    ],
  },
  {
    group: 'Carbonate chemistry',
    items: [
      { type: 'carbonate', field: 'pco2_uatm', kinds: ['pco2'] },
      { type: 'carbonate', field: 'omega_ar', kinds: ['pco2'] },
      { type: 'carbonate', field: 'ph_total', kinds: ['pco2'] },
    ],
  },
  {
    group: 'Water level, waves and current',
    items: [
      { type: 'waves', field: 'depth_m', kinds: ['pressure'] },
      { type: 'waves', field: 'hm0_m', kinds: ['pressure'] },
      { type: 'waves', field: 'tp_s', kinds: ['pressure'] },
      { type: 'current', field: 'speed_m_s', kinds: ['adcp'] },
      { type: 'current', field: 'dir_to_deg', kinds: ['adcp'] },
    ],
  },
  {
    group: 'Light',
    items: [{ type: 'light', field: 'par_umol_m2_s', kinds: ['par'] }],
  },
  {
    group: 'Weather',
    items: [
      { type: 'met', field: 'wind_m_s', kinds: [] },
      { type: 'met', field: 'wind_dir_deg', kinds: [] },
      { type: 'met', field: 'baro_hpa', kinds: [] },
      { type: 'met', field: 'air_temp_c', kinds: [] },
    ],
  },
];

/** Fields drawn as points only (a direction's wrap at 360 degrees is not a change). */
export const POINTS_ONLY = new Set(['dir_to_deg', 'wind_dir_deg']);

/**
 * The groups of quantities a station shows.
 * @param {SiteInfo} site
 * @param {string} stationId
 * @param {RecordStore} store
 */
export function stationGroups(site, stationId, store) {
  const st = site.stations.find((s) => s.id === stationId);
  const kinds = new Set(st ? st.sensors.filter((s) => s.enabled).map((s) => s.kind) : []);
  return STATION_GROUPS.map((g) => ({
    group: g.group,
    items: g.items.filter(
      (i) =>
        site.record_types[i.type]?.fields[i.field] !== undefined &&
        (i.kinds.some((k) => kinds.has(k)) ||
          store.seriesOf(i.type, stationId).some((s) => s.r.some((r) => typeof r[i.field] === 'number'))),
    ),
  })).filter((g) => g.items.length > 0);
}

/**
 * The site's limits for a quantity at a station (threshold rules whose metric carries it).
 * @param {SiteInfo} site
 * @param {string} type
 * @param {string} field
 * @param {string} station
 * @returns {SiteRule[]}
 */
export function limitsFor(site, type, field, station) {
  return site.rules.filter(
    (r) =>
      r.class === 'threshold' &&
      recordMetric(r.metric) === `${type}.${field}` &&
      (r.stations === null || r.stations.includes(station)),
  );
}

/**
 * @typedef {{
 *   xs: number[], lines: (number | null)[][], sensors: string[],
 *   marks: {x: number, y: number, flag: number, line: number}[],
 *   recs: (Rec | null)[][]
 * }} PlotColumns
 */

/**
 * Columns of one quantity at a station for uPlot: times in seconds, one line per sensor, values flagged 4 or
 * 9 left out of the line (drawn as marks instead, as are the suspect ones), and a break wherever a series
 * has a gap of more than three of its usual intervals (a silent sensor shows as a gap, not a straight line).
 * @param {{sensor: string, t: number[], r: Rec[]}[]} series
 * @param {string} field
 * @param {number} fromMs
 * @param {number} toMs
 * @returns {PlotColumns}
 */
export function plotColumns(series, field, fromMs, toMs) {
  /** @type {Map<number, (Rec | null)[]>} */
  const byX = new Map();
  const n = series.length;
  series.forEach((s, i) => {
    const lo = lowerBound(s.t, fromMs);
    const hi = lowerBound(s.t, toMs);
    const gaps = [];
    for (let j = lo + 1; j < hi; j++)
      gaps.push(/** @type {number} */ (s.t[j]) - /** @type {number} */ (s.t[j - 1]));
    const usual = median(gaps);
    for (let j = lo; j < hi; j++) {
      const tMs = /** @type {number} */ (s.t[j]);
      if (j > lo && usual > 0 && tMs - /** @type {number} */ (s.t[j - 1]) > 3 * usual) {
        const gapX = Math.round((tMs + /** @type {number} */ (s.t[j - 1])) / 2000);
        if (!byX.has(gapX)) byX.set(gapX, Array(n).fill(null));
      }
      const x = Math.round(tMs / 1000);
      let row = byX.get(x);
      if (!row) byX.set(x, (row = Array(n).fill(null)));
      row[i] = /** @type {Rec} */ (s.r[j]);
    }
  });
  const xs = [...byX.keys()].sort((a, b) => a - b);
  /** @type {(number | null)[][]} */
  const lines = series.map(() => []);
  /** @type {(Rec | null)[][]} */
  const recs = series.map(() => []);
  /** @type {PlotColumns['marks']} */
  const marks = [];
  for (const x of xs) {
    const row = /** @type {(Rec | null)[]} */ (byX.get(x));
    row.forEach((r, i) => {
      const v = r ? r[field] : null;
      const flag = r && typeof r.flag === 'number' ? r.flag : 1;
      const ok = typeof v === 'number' && Number.isFinite(v);
      /** @type {(number | null)[]} */ (lines[i]).push(ok && flag !== 4 && flag !== 9 ? v : null);
      /** @type {(Rec | null)[]} */ (recs[i]).push(r);
      if (ok && (flag === 3 || flag === 4)) marks.push({ x, y: /** @type {number} */ (v), flag, line: i });
    });
  }
  return { xs, lines, sensors: series.map((s) => s.sensor), marks, recs };
}

/**
 * @typedef {{
 *   xs: number[], ncp: (number | null)[], ncpLo: (number | null)[], ncpHi: (number | null)[],
 *   nec: (number | null)[], necLo: (number | null)[], necHi: (number | null)[],
 *   ncpSig: boolean[], necSig: boolean[], recs: Rec[],
 *   invalid: {fromS: number, toS: number, reasons: string}[]
 * }} FluxColumns
 */

/**
 * NCP and NEC of valid windows with their 1-sigma bands and significance; invalid windows as spans with their
 * reasons (the window is `windowMin` long, centred on its record time).
 * @param {{t: number[], r: Rec[]}} s
 * @param {number} fromMs
 * @param {number} toMs
 * @param {number} windowMin
 * @returns {FluxColumns}
 */
export function fluxColumns(s, fromMs, toMs, windowMin) {
  /** @type {FluxColumns} */
  const out = {
    xs: [],
    ncp: [],
    ncpLo: [],
    ncpHi: [],
    nec: [],
    necLo: [],
    necHi: [],
    ncpSig: [],
    necSig: [],
    recs: [],
    invalid: [],
  };
  const half = (windowMin * 60) / 2;
  const lo = lowerBound(s.t, fromMs);
  const hi = lowerBound(s.t, toMs);
  let prevX = -Infinity;
  for (let j = lo; j < hi; j++) {
    const r = /** @type {Rec} */ (s.r[j]);
    const x = Math.round(/** @type {number} */ (s.t[j]) / 1000);
    const valid = r.valid === true;
    const num = (/** @type {unknown} */ v) =>
      valid && typeof v === 'number' && Number.isFinite(v) ? v : null;
    const ncp = num(r.ncp_mmol_m2_h);
    const nec = num(r.nec_mmol_m2_h);
    const sn = typeof r.ncp_sigma_mmol_m2_h === 'number' ? r.ncp_sigma_mmol_m2_h : null;
    const sc = typeof r.nec_sigma_mmol_m2_h === 'number' ? r.nec_sigma_mmol_m2_h : null;
    // A run of windows more than three cadences apart is a gap in the line.
    if (x - prevX > 6 * half && Number.isFinite(prevX))
      pushFlux(out, Math.round((x + prevX) / 2), null, null, null, null, false, false, r);
    pushFlux(out, x, ncp, sn, nec, sc, r.ncp_significant === true, r.nec_significant === true, r);
    prevX = x;
    if (!valid) {
      const reasons =
        typeof r.invalid_reasons === 'string' && r.invalid_reasons !== '' ? r.invalid_reasons : 'invalid';
      const last = out.invalid[out.invalid.length - 1];
      if (last && last.reasons === reasons && x - half <= last.toS + 1) last.toS = x + half;
      else out.invalid.push({ fromS: x - half, toS: x + half, reasons });
    }
  }
  return out;
}

/**
 * @param {FluxColumns} o
 * @param {number} x
 * @param {number | null} ncp
 * @param {number | null} sn
 * @param {number | null} nec
 * @param {number | null} sc
 * @param {boolean} ncpSig
 * @param {boolean} necSig
 * @param {Rec} r
 */
function pushFlux(o, x, ncp, sn, nec, sc, ncpSig, necSig, r) {
  o.xs.push(x);
  o.ncp.push(ncp);
  o.ncpLo.push(ncp !== null && sn !== null ? ncp - sn : null);
  o.ncpHi.push(ncp !== null && sn !== null ? ncp + sn : null);
  o.nec.push(nec);
  o.necLo.push(nec !== null && sc !== null ? nec - sc : null);
  o.necHi.push(nec !== null && sc !== null ? nec + sc : null);
  o.ncpSig.push(ncpSig);
  o.necSig.push(necSig);
  o.recs.push(r);
}

/**
 * Index of the first element >= x in a sorted array.
 * @param {readonly number[]} a
 * @param {number} x
 */
export function lowerBound(a, x) {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (/** @type {number} */ (a[mid]) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** @param {readonly number[]} xs */
function median(xs) {
  if (xs.length === 0) return 0;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? (s[m] ?? 0) : ((s[m - 1] ?? 0) + (s[m] ?? 0)) / 2;
}

/**
 * The time range shown: one of the presets ending now, or a range the person zoomed or panned to.
 * @param {{presetH: number | null, fromMs: number, toMs: number}} view
 * @param {number} nowMs
 */
export function viewRange(view, nowMs) {
  if (view.presetH !== null) return { fromMs: nowMs - view.presetH * 3_600_000, toMs: nowMs + 60_000 };
  return { fromMs: view.fromMs, toMs: view.toMs };
}

/**
 * Shifts a range by a fraction of its width (negative: earlier), never past `nowMs`.
 * @param {{fromMs: number, toMs: number}} r
 * @param {number} fraction
 * @param {number} nowMs
 */
export function pan(r, fraction, nowMs) {
  const w = r.toMs - r.fromMs;
  let from = r.fromMs + fraction * w;
  if (from + w > nowMs + 60_000) from = nowMs + 60_000 - w;
  return { fromMs: from, toMs: from + w };
}

/**
 * @typedef {{
 *   tMinS: number, minMgL: number, loMgL: number, hiMgL: number, issuedMs: number, rec: Rec
 * }} ForecastMark
 */

/**
 * The forecast a station's oxygen plot shows: the newest one issued by the end of the range whose expected
 * minimum falls after its start (so a range of past nights shows the forecast of that night).
 * @param {readonly Rec[]} forecasts the station's forecast records, in time order
 * @param {{fromMs: number, toMs: number}} range
 * @returns {ForecastMark | null}
 */
export function stationForecast(forecasts, range) {
  for (let i = forecasts.length - 1; i >= 0; i--) {
    const f = /** @type {Rec} */ (forecasts[i]);
    const issuedMs = Date.parse(f.t);
    const tMinMs = typeof f.t_min === 'string' ? Date.parse(f.t_min) : NaN;
    if (!(issuedMs <= range.toMs)) continue;
    const ok = [f.o2_min_mg_l, f.o2_min_lo_mg_l, f.o2_min_hi_mg_l].every(
      (v) => typeof v === 'number' && Number.isFinite(v),
    );
    if (!ok || !Number.isFinite(tMinMs)) continue;
    if (tMinMs < range.fromMs) return null;
    return {
      tMinS: tMinMs / 1000,
      minMgL: /** @type {number} */ (f.o2_min_mg_l),
      loMgL: /** @type {number} */ (f.o2_min_lo_mg_l),
      hiMgL: /** @type {number} */ (f.o2_min_hi_mg_l),
      issuedMs,
      rec: f,
    };
  }
  return null;
}

/**
 * The range a station shows with its forecast: a range ending now reaches on to the expected minimum (and a
 * little beyond) while it is still ahead, so tonight's forecast stands beside the water's course so far.
 * @param {{fromMs: number, toMs: number}} range
 * @param {ForecastMark | null} mark
 * @param {boolean} live the range ends now (a preset)
 */
export function rangeWithForecast(range, mark, live) {
  if (!mark || !live) return range;
  const tMinMs = mark.tMinS * 1000;
  if (tMinMs <= range.toMs || tMinMs - range.toMs > 24 * 3_600_000) return range;
  return { fromMs: range.fromMs, toMs: tMinMs + 0.05 * (tMinMs - range.fromMs) };
}

/**
 * The observed value of a field nearest to a time, over a station's sensors, within `withinMs` (a value failed
 * by QC is not an observation).
 * @param {{t: number[], r: Rec[]}[]} series
 * @param {string} field
 * @param {number} tMs
 * @param {number} withinMs
 * @returns {{value: number, tMs: number} | null}
 */
export function observedNear(series, field, tMs, withinMs) {
  /** @type {{value: number, tMs: number} | null} */
  let best = null;
  for (const s of series) {
    const i = lowerBound(s.t, tMs);
    for (const j of [i - 1, i]) {
      const r = s.r[j];
      const t = s.t[j];
      if (!r || t === undefined || Math.abs(t - tMs) > withinMs) continue;
      const v = r[field];
      if (typeof v !== 'number' || !Number.isFinite(v) || r.flag === 4 || r.flag === 9) continue;
      if (!best || Math.abs(t - tMs) < Math.abs(best.tMs - tMs)) best = { value: v, tMs: t };
    }
  }
  return best;
}
