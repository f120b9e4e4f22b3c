// Fitting sensor corrections against bottles (docs/methods/calibration.md 13.3-13.5):
//   pCO2: reference - raw = offset + drift_per_day x days (slope 1), the reference being pCO2 computed
//         from the bottle's TA and DIC at the sensor's temperature (libs/carbonate);
//   oxygen optode: reference / raw = slope + slope_drift_per_day x days (a gain and its drift, no offset),
//         the reference being the bottle's o2_umol_kg and raw the optode's O2 in umol/kg at the same time.
// Both are robust line fits in days (robust.ts), refused with a reason when the bottles are too few, too
// close together in time, or mostly outliers.
import { solveCarbonate, type CarbonateOptions } from '../carbonate/index.js';
import type { CalibrationErrorCode } from './errors.js';
import { robustLine, robustLocation, type LineFit } from './robust.js';
import type { CalibrationEntry } from './schema.js';

const DAY_MS = 86_400_000;

export interface FitOptions {
  /** Fewest pairs with weight > 0 (default 4 with drift, 3 without). */
  minPairs?: number;
  /** Shortest time the bottles must span to fit a drift, days (default 1). */
  minSpanDays?: number;
  /** Smallest fraction of the sensor's record the bottles must span to fit a drift (default 0.3). */
  minSpanFraction?: number;
  /**
   * Drift: 'auto' (default) fits it and keeps it only when it is distinguishable from zero (|drift| > 2 SE),
   * else refits a constant, since a drift that the bottles cannot tell from zero only adds noise (common
   * practice: the simpler model unless the data need the other); true always keeps it; false fits a
   * constant offset or gain only.
   */
  drift?: boolean | 'auto';
  /**
   * Largest robust scatter of the bottles about the fit that is believed: pCO2 in uatm (default 15), the
   * optode gain as a fraction (default 0.05). Past it the bottles disagree among themselves more than any
   * calibration could fix (mostly outliers, or bottles paired with the wrong water), and the fit is refused.
   */
  maxScale?: number;
}

/** The sensor and field corrected, and the start of days (the sensor's first reading). */
export interface FitTarget {
  sensor: string;
  field: string;
  fromMs: number;
  /** Last reading of the sensor: the record span for the spread check. */
  toMs: number;
}

export interface Pair {
  tMs: number;
  /** The sensor's reading paired with the bottle (median within the matching window), field units. */
  raw: number;
  /** The bottle's reference value in the same units. */
  reference: number;
}

export interface FitRow extends Pair {
  days: number;
  corrected: number;
  /** reference - corrected, field units. */
  residual: number;
  /** Bisquare weight; 0 marks a bottle rejected as an outlier. */
  weight: number;
}

export interface FitParam {
  name: 'offset' | 'drift_per_day' | 'slope' | 'slope_drift_per_day';
  value: number;
  se: number;
}

export type FitResult =
  | {
      ok: true;
      entry: CalibrationEntry;
      params: FitParam[];
      rows: FitRow[];
      /** Robust scale of the residuals, field units. */
      scale: number;
      outliers: number;
      /** Set when 'auto' dropped a drift the bottles could not tell from zero: its value and SE. */
      driftDropped?: { value: number; se: number };
    }
  | { ok: false; code: CalibrationErrorCode; reason: string; rows: FitRow[] };

type Model = 'offset' | 'gain';

function spreadProblem(target: FitTarget, days: number[], opts: FitOptions): string | undefined {
  const span = Math.max(...days) - Math.min(...days);
  const recordDays = (target.toMs - target.fromMs) / DAY_MS;
  const minSpan = opts.minSpanDays ?? 1;
  const minFrac = opts.minSpanFraction ?? 0.3;
  if (span < minSpan)
    return `the bottles span ${span.toFixed(2)} d; a drift needs at least ${minSpan} d (or fit without drift)`;
  if (recordDays > 0 && span < minFrac * recordDays)
    return (
      `the bottles span ${span.toFixed(2)} d of the sensor's ${recordDays.toFixed(2)} d record; a drift needs ` +
      `at least ${Math.round(minFrac * 100)} % of it (or fit without drift)`
    );
  return undefined;
}

type FitFail = Extract<FitResult, { ok: false }>;

/** The bottles in time order, their days since the record's start, and what the fit asks for. */
interface FitSetup {
  readonly model: Model;
  readonly target: FitTarget;
  readonly opts: FitOptions;
  readonly sorted: readonly Pair[];
  readonly days: number[];
  readonly minPairs: number;
}

/** The rows of a failed fit: the bottles against the uncorrected readings. */
function blankRows(s: FitSetup): FitRow[] {
  return s.sorted.map((p, i) => ({
    ...p,
    days: s.days[i] as number,
    corrected: p.raw,
    residual: p.reference - p.raw,
    weight: 1,
  }));
}

/** Too few bottles, readings a gain cannot use, or bottles too close in time for a drift. */
function checkBottles(s: FitSetup, drift: boolean): FitFail | undefined {
  const { sorted, target, minPairs } = s;
  if (sorted.length < minPairs) {
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_TOO_FEW',
      reason: `${sorted.length} bottle-sensor pair(s) for ${target.sensor}; at least ${minPairs} are needed`,
      rows: blankRows(s),
    };
  }
  if (s.model === 'gain') {
    const bad = sorted.find((p) => !(p.raw > 1));
    if (bad !== undefined) {
      return {
        ok: false,
        code: 'REEFD_CALIBRATION_NO_REFERENCE',
        reason: `the optode read ${bad.raw} at ${new Date(bad.tMs).toISOString()}: a gain needs readings above 1`,
        rows: blankRows(s),
      };
    }
  }
  if (drift) {
    const why = spreadProblem(target, s.days, s.opts);
    if (why !== undefined)
      return { ok: false, code: 'REEFD_CALIBRATION_SPREAD', reason: why, rows: blankRows(s) };
  }
  return undefined;
}

/** The robust line (or constant); with 'auto', a drift the bottles cannot tell from zero is dropped. */
function robustFit(s: FitSetup, y: number[], driftIn: boolean, auto: boolean) {
  let drift = driftIn;
  let f: LineFit | undefined = drift ? robustLine(s.days, y) : robustLocation(y);
  let driftDropped: { value: number; se: number } | undefined;
  if (f !== undefined && drift && auto && !(Math.abs(f.b) > 2 * f.seB)) {
    const constant = robustLocation(y);
    if (constant !== undefined) {
      driftDropped = { value: f.b, se: f.seB };
      f = constant;
      drift = false;
    }
  }
  return { f, drift, driftDropped };
}

/** A fit whose bottles scatter too much about it, or of which too few agree. */
function checkScatter(s: FitSetup, f: LineFit, rows: FitRow[], inliers: number): FitFail | undefined {
  const { model, target } = s;
  const outliers = rows.length - inliers;
  const maxScale = s.opts.maxScale ?? (model === 'offset' ? 15 : 0.05);
  if (f.scale > maxScale) {
    const unit = model === 'offset' ? ' uatm' : '';
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_OUTLIERS',
      reason:
        `the bottles scatter by ${f.scale.toPrecision(3)}${unit} about the fit for ${target.sensor}, more than ` +
        `the ${maxScale}${unit} a calibration can trust: check the bottles and their pairing`,
      rows,
    };
  }
  if (inliers < s.minPairs || inliers * 2 < rows.length) {
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_OUTLIERS',
      reason: `${outliers} of ${rows.length} bottles rejected as outliers for ${target.sensor}; too few agree`,
      rows,
    };
  }
  return undefined;
}

/** The calibration entry and the fitted parameters with their standard errors. */
function fitEntry(s: FitSetup, f: LineFit, drift: boolean): { entry: CalibrationEntry; params: FitParam[] } {
  const { model, target } = s;
  const entry: CalibrationEntry = {
    sensor: target.sensor,
    field: target.field,
    from: new Date(target.fromMs).toISOString(),
    slope: model === 'gain' ? f.a : 1,
    offset: model === 'offset' ? f.a : 0,
    drift_per_day: model === 'offset' && drift ? f.b : 0,
    slope_drift_per_day: model === 'gain' && drift ? f.b : 0,
  };
  const params: FitParam[] =
    model === 'offset'
      ? [
          { name: 'offset', value: f.a, se: f.seA },
          ...(drift ? [{ name: 'drift_per_day' as const, value: f.b, se: f.seB }] : []),
        ]
      : [
          { name: 'slope', value: f.a, se: f.seA },
          ...(drift ? [{ name: 'slope_drift_per_day' as const, value: f.b, se: f.seB }] : []),
        ];
  return { entry, params };
}

function fit(model: Model, target: FitTarget, pairs: readonly Pair[], opts: FitOptions): FitResult {
  const auto = opts.drift === undefined || opts.drift === 'auto';
  const driftAsked = opts.drift !== false;
  const minPairs = opts.minPairs ?? (driftAsked ? 4 : 3);
  const sorted = [...pairs].sort((p, q) => p.tMs - q.tMs);
  const days = sorted.map((p) => (p.tMs - target.fromMs) / DAY_MS);
  const setup: FitSetup = { model, target, opts, sorted, days, minPairs };
  const bad = checkBottles(setup, driftAsked);
  if (bad !== undefined) return bad;
  const y = sorted.map((p) => (model === 'offset' ? p.reference - p.raw : p.reference / p.raw));
  const { f, drift, driftDropped } = robustFit(setup, y, driftAsked, auto);
  if (f === undefined) {
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_SPREAD',
      reason: 'the bottles are all at one time; nothing determines a drift',
      rows: blankRows(setup),
    };
  }
  const rows: FitRow[] = sorted.map((p, i) => {
    const d = days[i] as number;
    const corr = model === 'offset' ? p.raw + f.a + f.b * d : (f.a + f.b * d) * p.raw;
    return { ...p, days: d, corrected: corr, residual: p.reference - corr, weight: f.weights[i] as number };
  });
  const inliers = rows.filter((r) => r.weight > 0).length;
  const outliers = rows.length - inliers;
  const scatter = checkScatter(setup, f, rows, inliers);
  if (scatter !== undefined) return scatter;
  const { entry, params } = fitEntry(setup, f, drift);
  // The scale of the fit is in y units; for the gain it is relative, so report it in field units.
  const meanRaw = sorted.reduce((s, p) => s + p.raw, 0) / sorted.length;
  const scale = model === 'offset' ? f.scale : f.scale * meanRaw;
  return { ok: true, entry, params, rows, scale, outliers, ...(driftDropped ? { driftDropped } : {}) };
}

/** pCO2 offset and drift of one sensor against reference pCO2 values (see pco2Reference). */
export function fitPco2(target: FitTarget, pairs: readonly Pair[], opts: FitOptions = {}): FitResult {
  return fit('offset', target, pairs, opts);
}

/** Optode gain and gain drift against reference oxygen (both umol/kg; the gain applies to any O2 field). */
export function fitOptodeGain(target: FitTarget, pairs: readonly Pair[], opts: FitOptions = {}): FitResult {
  return fit('gain', target, pairs, opts);
}

export interface Pco2Bottle {
  taUmolKg: number;
  dicUmolKg: number;
  salinity: number;
}

/**
 * pCO2 (uatm, wet air at 1 atm total pressure unless baroHpa is given) of a bottle's TA and DIC at the
 * sensor's temperature: the value a perfect sensor would have read in that water (docs/methods/carbonate.md
 * 3.7). Undefined when the pair has no solution.
 */
export function pco2Reference(
  b: Pco2Bottle,
  sensorTempC: number,
  options: CarbonateOptions,
  baroHpa?: number,
): number | undefined {
  const r = solveCarbonate(
    {
      salinity: b.salinity,
      tempC: sensorTempC,
      taUmolKg: b.taUmolKg,
      dicUmolKg: b.dicUmolKg,
      ...(baroHpa !== undefined ? { baroHpa } : {}),
    },
    options,
  );
  return r.ok && Number.isFinite(r.pco2Uatm) ? r.pco2Uatm : undefined;
}

/** Index of the first element of sorted `t` that is >= x. */
function lowerBound(t: ArrayLike<number>, x: number): number {
  let lo = 0;
  let hi = t.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((t[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * The median of the readings within +-windowMs of tMs (t sorted ascending), or undefined when there are
 * none. The median keeps a single spiking reading from setting the pair.
 */
export function medianWithin(
  t: ArrayLike<number>,
  v: ArrayLike<number>,
  tMs: number,
  windowMs: number,
): number | undefined {
  const i0 = lowerBound(t, tMs - windowMs);
  const vals: number[] = [];
  for (let i = i0; i < t.length && (t[i] as number) <= tMs + windowMs; i++) {
    const x = v[i] as number;
    if (Number.isFinite(x)) vals.push(x);
  }
  if (vals.length === 0) return undefined;
  vals.sort((a, b) => a - b);
  const h = vals.length >> 1;
  return vals.length % 2 === 1 ? (vals[h] as number) : ((vals[h - 1] as number) + (vals[h] as number)) / 2;
}
