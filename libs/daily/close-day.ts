// One transect's local day, closed: the day's and the sliding week's light-response fits, then the budget
// (docs/methods/daily.md 10.2-10.6). Pure: the same windows give the same result, live and in replay.
import { combine, estimateSlots, type FillCurve, type RateSeries } from './budget.js';
import {
  fitCalcificationLight,
  fitProductionLight,
  fitTanhFixedIk,
  type LightFitOptions,
  type LightFitResult,
  type LightPoint,
} from './light-response.js';
import type { LocalDayBounds } from './local-day.js';
import { fitCalcificationOmega, type OmegaFitOptions, type OmegaFitResult } from './omega.js';
import { buildSlots, type FluxWindowInput, type Slot } from './slots.js';

export interface DailyOptions {
  /** Processing cadence and flux window, minutes (contract `processing.cadence_min`, `window_min`). */
  cadenceMin: number;
  windowMin: number;
  /** PAR below this is night (default 1 umol m-2 s-1, common practice). */
  darkParUmolM2S?: number;
  /** Fewest valid night slots for respiration from the night mean (default 6, one hour); below it the
   * production-light fit's R is used. */
  minNightWindows?: number;
  /** Largest fraction of the day that may be filled (curve + interpolation) in a valid budget (default 0.6). */
  maxFilledFraction?: number;
  /** Longest gap bridged by linear interpolation, of PAR or of a rate, minutes (default 60). */
  maxInterpMin?: number;
  /** Site position: darkness where PAR is missing (docs/methods/daily.md 10.5). */
  sun?: { latDeg: number; lonDeg: number };
  light?: LightFitOptions;
  omega?: OmegaFitOptions;
}

/** Which curve filled the gaps: the day's own fit, the day's windows with the week's Ik, or the week's fit. */
export type FillSource = 'day' | 'day_week_ik' | 'week';

export interface DailyValue {
  /** mmol m-2 d-1 (NCP, R, GPP in O2; NEC in CaCO3), or null when it cannot be formed. */
  value: number | null;
  sigma: number | null;
}

export interface FitSet {
  ncp: LightFitResult;
  nec: LightFitResult;
  omega: OmegaFitResult;
}

export interface DailyResult {
  bounds: LocalDayBounds;
  ncp: DailyValue;
  r: DailyValue;
  gpp: DailyValue;
  /** GPP/R (dimensionless). */
  pr: DailyValue;
  nec: DailyValue;
  necDay: DailyValue;
  necNight: DailyValue;
  /** Fractions of the day's slots: measured and valid, filled by the light response, interpolated. */
  coverage: number;
  gapFilled: number;
  interpolated: number;
  necCoverage: number;
  necGapFilled: number;
  nightSlots: number;
  /** Hourly respiration used (mmol m-2 h-1) and where it came from. */
  rHourly: DailyValue;
  rSource: 'night_mean' | 'fit' | null;
  fillCurve: FillSource | null;
  necFillCurve: FillSource | null;
  day: FitSet;
  week: FitSet;
  valid: boolean;
  invalidReasons: string[];
}

const NULL: DailyValue = { value: null, sigma: null };
const val = (c: { value: number; variance: number } | undefined): DailyValue =>
  c ? { value: c.value, sigma: Math.sqrt(c.variance) } : NULL;

function points(ws: readonly FluxWindowInput[], kind: 'ncp' | 'nec'): LightPoint[] {
  const out: LightPoint[] = [];
  for (const w of ws) {
    const rate = kind === 'ncp' ? w.ncpMmolM2H : w.necMmolM2H;
    const sigma = kind === 'ncp' ? w.ncpSigmaMmolM2H : w.necSigmaMmolM2H;
    if (!w.valid || rate === null || sigma === null || !(sigma > 0) || w.parUmolM2S === null) continue;
    if (!Number.isFinite(rate) || !Number.isFinite(w.parUmolM2S)) continue;
    out.push({ parUmolM2S: Math.max(0, w.parUmolM2S), rate, sigma });
  }
  return out;
}

function lightOptions(o: DailyOptions): LightFitOptions {
  return {
    overlapFactor: Math.max(1, o.windowMin / o.cadenceMin),
    darkParUmolM2S: o.darkParUmolM2S ?? 1,
    ...o.light,
  };
}

/** The three fits over a set of windows. */
export function fitWindows(ws: readonly FluxWindowInput[], o: DailyOptions): FitSet {
  const overlapFactor = Math.max(1, o.windowMin / o.cadenceMin);
  const light = lightOptions(o);
  const om = ws.flatMap((w) =>
    w.valid &&
    w.necMmolM2H !== null &&
    w.necSigmaMmolM2H !== null &&
    w.necSigmaMmolM2H > 0 &&
    w.omegaAr != null
      ? [{ omegaAr: w.omegaAr, rate: w.necMmolM2H, sigma: w.necSigmaMmolM2H }]
      : [],
  );
  return {
    ncp: fitProductionLight(points(ws, 'ncp'), light),
    nec: fitCalcificationLight(points(ws, 'nec'), light),
    omega: fitCalcificationOmega(om, { overlapFactor, ...o.omega }),
  };
}

/** The fill curve: the day's windows with the sliding week's Ik when the week's fit stands (see
 * fitTanhFixedIk), else the day's own free fit, else the week's fit (docs/methods/daily.md 10.4). */
function pickFill(
  dayPoints: readonly LightPoint[],
  sign: -1 | 1,
  day: LightFitResult,
  week: LightFitResult,
  o: LightFitOptions,
): { fill?: FillCurve; from: FillSource | null } {
  if (week.ok) {
    const fixed = fitTanhFixedIk(dayPoints, sign, week.curve.ik, week.se.ik ** 2, o);
    if (fixed.ok && fixed.nDark >= (o.minDark ?? 3))
      return { fill: { curve: fixed.curve, residualSd: fixed.residualSd }, from: 'day_week_ik' };
  }
  if (day.ok) return { fill: { curve: day.curve, residualSd: day.residualSd }, from: 'day' };
  if (week.ok) return { fill: { curve: week.curve, residualSd: week.residualSd }, from: 'week' };
  return { from: null };
}

/**
 * Closes one local day of one transect. dayWindows are the flux windows whose centres fall in the day;
 * weekWindows those of the seven local days ending with it (the day's included).
 */
export function closeDay(
  bounds: LocalDayBounds,
  dayWindows: readonly FluxWindowInput[],
  weekWindows: readonly FluxWindowInput[],
  o: DailyOptions,
): DailyResult {
  const dark = o.darkParUmolM2S ?? 1;
  const m = Math.max(1, o.windowMin / o.cadenceMin);
  const stepH = o.cadenceMin / 60;
  const maxInterpSlots = Math.floor((o.maxInterpMin ?? 60) / o.cadenceMin);
  const slots = buildSlots(bounds.startMs, bounds.endMs, dayWindows, {
    cadenceMin: o.cadenceMin,
    ...(o.maxInterpMin !== undefined ? { maxInterpMin: o.maxInterpMin } : {}),
    ...(o.sun ? { sun: o.sun } : {}),
  });
  const day = fitWindows(dayWindows, o);
  const week = fitWindows(weekWindows, o);
  const light = lightOptions(o);
  const ncpFill = pickFill(points(dayWindows, 'ncp'), -1, day.ncp, week.ncp, light);
  const necFill = pickFill(points(dayWindows, 'nec'), 1, day.nec, week.nec, light);
  const isNight = (s: Slot) => s.par !== null && s.par < dark;
  const ncpSeries = estimateSlots(
    slots,
    (s) => (s.ncp !== null && s.ncpSigma !== null ? { value: s.ncp, sigma: s.ncpSigma } : null),
    ncpFill.fill,
    maxInterpSlots,
  );
  const necSeries = estimateSlots(
    slots,
    (s) => (s.nec !== null && s.necSigma !== null ? { value: s.nec, sigma: s.necSigma } : null),
    necFill.fill,
    maxInterpSlots,
  );
  const resp = respiration(slots, ncpSeries, isNight, ncpFill.fill, o.minNightWindows ?? 6, m);
  const D = bounds.hours;
  const all = () => stepH;
  // Night measured slots carry R's coefficient -D/N in GPP = NCP + R (they enter both).
  const ncp = combine(ncpSeries, all, ncpFill.fill, m, resp.inflate);
  const rDaily = resp.source
    ? combine(ncpSeries, (k) => D * resp.coef(k), ncpFill.fill, m, resp.inflate, resp.extra(D))
    : undefined;
  const gpp = resp.source
    ? combine(ncpSeries, (k) => stepH + D * resp.coef(k), ncpFill.fill, m, resp.inflate, resp.extra(D))
    : undefined;
  const nec = combine(necSeries, all, necFill.fill, m);
  const necDay = combine(necSeries, (k) => (isNight(slots[k] as Slot) ? 0 : stepH), necFill.fill, m);
  const necNight = combine(necSeries, (k) => (isNight(slots[k] as Slot) ? stepH : 0), necFill.fill, m);
  const n = slots.length;
  const reasons: string[] = [];
  if (!resp.source) reasons.push('no_respiration');
  if (ncpSeries.missing > 0) reasons.push('unfillable_gap');
  if ((ncpSeries.curve + ncpSeries.interp) / n > (o.maxFilledFraction ?? 0.6))
    reasons.push('too_much_filled');
  // GPP/R = 1 + NCP/R; its sigma from NCP/R, first order, ignoring their covariance.
  const pr =
    ncp && rDaily && rDaily.value > 0
      ? {
          value: 1 + ncp.value / rDaily.value,
          sigma: Math.hypot(
            Math.sqrt(ncp.variance) / rDaily.value,
            (ncp.value * Math.sqrt(rDaily.variance)) / rDaily.value ** 2,
          ),
        }
      : NULL;
  return {
    bounds,
    ncp: val(ncp),
    r: val(rDaily),
    gpp: val(gpp),
    pr,
    nec: val(nec),
    necDay: val(necDay),
    necNight: val(necNight),
    coverage: ncpSeries.measured / n,
    gapFilled: ncpSeries.curve / n,
    interpolated: ncpSeries.interp / n,
    necCoverage: necSeries.measured / n,
    necGapFilled: necSeries.curve / n,
    nightSlots: resp.nightMeasured,
    rHourly: resp.hourly,
    rSource: resp.source,
    fillCurve: ncpFill.from,
    necFillCurve: necFill.from,
    day,
    week,
    valid: reasons.length === 0,
    invalidReasons: reasons,
  };
}

interface Respiration {
  source: 'night_mean' | 'fit' | null;
  /** Coefficient of slot k's NCP in the hourly R (night mean), or 0. */
  coef: (k: number) => number;
  /** Gradient on the curve's parameters for R from the fit (times the day length). */
  extra: (hours: number) => [number, number, number];
  /** Variance inflation of night slots: the night scatter over the propagated sigmas, at least 1. */
  inflate: (k: number) => number;
  hourly: DailyValue;
  nightMeasured: number;
}

/** R from the mean of the measured night slots, R_h = -mean(NCP_night) (common practice: daytime respiration
 * taken equal to the night-time rate), or from the production-light fit with too few night slots. */
function respiration(
  slots: readonly Slot[],
  series: RateSeries,
  isNight: (s: Slot) => boolean,
  fill: FillCurve | undefined,
  minNight: number,
  overlap: number,
): Respiration {
  const night = series.est.flatMap((e, k) => (e.kind === 'measured' && isNight(slots[k] as Slot) ? [k] : []));
  const N = night.length;
  const none = { coef: () => 0, extra: () => [0, 0, 0] as [number, number, number], inflate: () => 1 };
  if (N >= minNight) {
    const vals = night.map((k) => (series.est[k] as { value: number }).value);
    const sig2 = night.map((k) => (series.est[k] as { sigma: number }).sigma ** 2);
    const mean = vals.reduce((a, b) => a + b, 0) / N;
    const s2 = vals.reduce((a, v) => a + (v - mean) ** 2, 0) / Math.max(1, N - 1);
    const meanSig2 = sig2.reduce((a, b) => a + b, 0) / N;
    const kappa = Math.max(1, s2 / meanSig2);
    const set = new Set(night);
    return {
      source: 'night_mean',
      coef: (k) => (set.has(k) ? -1 / N : 0),
      extra: () => [0, 0, 0],
      inflate: (k) => (set.has(k) ? kappa : 1),
      hourly: { value: -mean, sigma: Math.sqrt((overlap * kappa * meanSig2) / N) },
      nightMeasured: N,
    };
  }
  if (fill) {
    const c = fill.curve;
    return {
      ...none,
      source: 'fit',
      extra: (hours) => [0, 0, hours],
      hourly: { value: c.intercept, sigma: Math.sqrt(c.cov[8] as number) },
      nightMeasured: N,
    };
  }
  return { ...none, source: null, hourly: NULL, nightMeasured: N };
}
