// One-box oxygen budget of a lagoon or pool station (docs/methods/forecast.md 11.4): the box exchanges its
// water with a source (the reef water that flushes it) at a rate proportional to a flushing driver, and its
// benthos respires at night:
//   dO/dt = kappa d(t) (O_src - O) - R c_mg / h(t),
// with O in mg/L, d the driver (the inflowing transport per metre over the box depth, q/h_box in m/h, or 1 for
// a constant rate), R in mmol O2 m-2 h-1, c_mg = 0.0319988 mg/L per mmol m-3 (the molar mass of O2) and h the
// box depth (m). The box's own night history fixes kappa and R by robust linear least squares on the
// finite-difference form (the budget is linear in both).
import { robustLinearFit } from '../daily/index.js';

/** mg/L per mmol m-3 of O2 (M(O2) = 31.9988 g/mol). */
export const O2_MG_L_PER_MMOL_M3 = 0.0319988;

export interface BoxSample {
  tMs: number;
  /** O2 of the box and of its source, mg/L. */
  o2MgL: number;
  o2SourceMgL: number;
  /** Box depth, m. */
  depthM: number;
  /** Flushing driver (m/h for q/h, or 1). */
  driver: number;
}

export interface BoxModel {
  ok: true;
  /** Exchange per unit driver (1/m when the driver is q/h in m/h; 1/h for a driver of 1). */
  kappa: number;
  /** Night respiration of the box's benthos, mmol O2 m-2 h-1 (positive). */
  rMmolM2H: number;
  /** Row-major 2 x 2 covariance of [kappa, R]. */
  cov: number[];
  /** Robust sd of the residual rate, mg/L h-1. */
  residualSdMgLH: number;
  n: number;
}

export type BoxModelResult = BoxModel | { ok: false; reason: string };

export interface BoxFitOptions {
  /** Fewest steps (default 24). */
  minSteps?: number;
  /** Longest step between consecutive samples, ms (default 45 min). */
  maxStepMs?: number;
}

/**
 * Fits kappa and R from consecutive night samples (each inner array one night, in time order).
 * Check (analytic): a box integrated exactly with known kappa and R gives them back to 1e-6.
 */
export function fitBoxModel(
  nights: ReadonlyArray<readonly BoxSample[]>,
  o: BoxFitOptions = {},
): BoxModelResult {
  const rows: number[][] = [];
  const y: number[] = [];
  const maxStep = o.maxStepMs ?? 45 * 60_000;
  for (const night of nights) {
    for (let i = 1; i < night.length; i++) {
      const a = night[i - 1] as BoxSample;
      const b = night[i] as BoxSample;
      const dtH = (b.tMs - a.tMs) / 3.6e6;
      if (!(dtH > 0) || b.tMs - a.tMs > maxStep) continue;
      // Exact for a linear relaxation over the step: the exchange term uses the step means.
      const d = 0.5 * (a.driver + b.driver);
      const src = 0.5 * (a.o2SourceMgL + b.o2SourceMgL);
      const box = 0.5 * (a.o2MgL + b.o2MgL);
      const h = 0.5 * (a.depthM + b.depthM);
      const row = [d * (src - box), -O2_MG_L_PER_MMOL_M3 / h];
      if (![...row, b.o2MgL - a.o2MgL].every(Number.isFinite)) continue;
      rows.push(row);
      y.push((b.o2MgL - a.o2MgL) / dtH);
    }
  }
  if (rows.length < (o.minSteps ?? 24)) return { ok: false, reason: `${rows.length} night steps` };
  // Tukey's biweight: an anomalous night (a bloom's decay, a stratified calm) can be a large share of the
  // steps, and a redescending loss gives those steps no weight at all.
  const fit = robustLinearFit(
    rows,
    y,
    y.map(() => 1),
    { loss: 'tukey' },
  );
  if (!fit.ok) return { ok: false, reason: fit.reason };
  const [kappa, r] = fit.coef as [number, number];
  if (!(kappa > 0)) return { ok: false, reason: `exchange rate ${kappa.toPrecision(3)} is not positive` };
  return { ok: true, kappa, rMmolM2H: r, cov: fit.cov, residualSdMgLH: fit.scale, n: fit.n };
}

/** One step of the box over dtH hours with the inputs held: the exact solution of the linear relaxation. */
export function stepBox(
  o2MgL: number,
  o2SourceMgL: number,
  k: number,
  respMgLH: number,
  dtH: number,
): number {
  if (k * dtH < 1e-9) return o2MgL - respMgLH * dtH + k * dtH * (o2SourceMgL - o2MgL);
  const eq = o2SourceMgL - respMgLH / k;
  return eq + (o2MgL - eq) * Math.exp(-k * dtH);
}
