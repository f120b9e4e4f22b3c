// Calibration of a station's forecasts by its own scored nights (docs/methods/forecast.md 11.6): model output
// statistics in their simplest form, with a prediction interval for the small number of nights behind them.
import type { IssueOptions } from './issue.js';
import type { ForecastError } from './state.js';

/** The 80 % interval of a normal: +-1.2816 sd. */
export const Z80 = 1.2815515655446004;

const HOUR = 3_600_000;
/** Prior weight, in nights, of a zero bias. */
const BIAS_PRIOR_NIGHTS = 3;

/** The nights the scored forecasts come from: the hourly forecasts of one night share its errors, so it is
 * nights that count as independent samples. Forecasts whose dusks (issue time less the lead) lie within
 * twelve hours of each other are one night; no calendar boundary is involved, so a dusk near midnight or noon
 * UTC counts the same as any other. */
export function nightsOf(rows: readonly ForecastError[]): number {
  const dusks = rows.map((e) => e.issueMs - e.lead * HOUR).sort((a, b) => a - b);
  let n = 0;
  let last = -Infinity;
  for (const d of dusks) {
    if (d - last > 12 * HOUR) n++;
    last = d;
  }
  return n;
}

/** Bias and model-error sd of a station from its scored forecasts at about the same lead, once they come
 * from minCalibration nights or more. */
export function calibration(
  errors: readonly ForecastError[],
  lead: number,
  o: Pick<IssueOptions, 'defaultModelSigmaMgL' | 'minCalibration'>,
): { bias: number; sigma: number; widen: number; ensembleScale: number } {
  let rows = errors.filter((e) => e.lead === lead);
  if (nightsOf(rows) < o.minCalibration) rows = errors.filter((e) => Math.abs(e.lead - lead) <= 1);
  if (nightsOf(rows) < o.minCalibration) rows = [...errors];
  if (nightsOf(rows) < o.minCalibration)
    return { bias: 0, sigma: o.defaultModelSigmaMgL, widen: 1, ensembleScale: 1 };
  const med = (xs: number[]) => {
    const q = [...xs].sort((a, b) => a - b);
    return 0.5 * ((q[(q.length - 1) >> 1] as number) + (q[q.length >> 1] as number));
  };
  // Nights far outside the usual errors (an event the model could not know) would drag the bias and the
  // spread of every ordinary night: beyond 6 robust sigmas they are left out of the calibration.
  const m0 = med(rows.map((e) => e.errMgL));
  const mad = 1.4826 * med(rows.map((e) => Math.abs(e.errMgL - m0)));
  if (mad > 0) {
    const kept = rows.filter((e) => Math.abs(e.errMgL - m0) <= 6 * mad);
    if (nightsOf(kept) >= o.minCalibration) rows = kept;
  }
  const bias = med(rows.map((e) => e.errMgL));
  const msErr = rows.reduce((a, e) => a + (e.errMgL - bias) ** 2, 0) / rows.length;
  const ensVar = rows.reduce((a, e) => a + ((e.halfLoMgL + e.halfHiMgL) / 2 / Z80) ** 2, 0) / rows.length;
  // A spread and a bias estimated from n nights: Student's t for n - 1 degrees of freedom instead of the
  // normal quantile, and (1 + 1/n) for the bias's own error (a prediction interval, common practice).
  // Members wider than the errors they should explain are narrowed towards them, the ratio shrunk towards 1
  // with a prior weight of five nights (a ratio from a few nights is noisy); errors wider than the members add
  // a model error in quadrature.
  const n = nightsOf(rows);
  return {
    // A bias from a few nights is shrunk towards none (prior weight of three nights): the first nights' errors
    // come from models still settling (a tide fitted on days, not weeks), and they should not be carried in full.
    bias: (bias * n) / (n + BIAS_PRIOR_NIGHTS),
    sigma: Math.sqrt(Math.max(0, msErr - ensVar)),
    widen: (studentT90(n - 1) / Z80) * Math.sqrt(1 + 1 / n),
    ensembleScale: ensVar > msErr ? Math.sqrt((n * (msErr / ensVar) + 5) / (n + 5)) : 1,
  };
}

/** The 0.9 quantile of Student's t with nu degrees of freedom, by the Cornish-Fisher expansion about the
 * normal quantile (Abramowitz & Stegun 1964, 26.7.5; within 0.2 % for nu >= 3). Check: nu = 9 gives 1.383. */
export function studentT90(nu: number): number {
  const z = Z80;
  if (!(nu >= 1)) return Infinity;
  const g1 = (z ** 3 + z) / 4;
  const g2 = (5 * z ** 5 + 16 * z ** 3 + 3 * z) / 96;
  const g3 = (3 * z ** 7 + 19 * z ** 5 + 17 * z ** 3 - 15 * z) / 384;
  return z + g1 / nu + g2 / nu ** 2 + g3 / nu ** 3;
}
