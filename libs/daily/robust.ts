// Robust weighted least squares: Huber's M-estimator by iteratively reweighted least squares (Huber 1964,
// Ann. Math. Stat. 35, 73; Holland & Welsch 1977, Commun. Stat. 6, 813), on residuals standardised by each
// point's own sigma and a robust scale (normalised MAD, Hampel 1974). docs/methods/daily.md 10.3.
//
// Covariance convention (stated so the reference suite can compare like with like): see fitCovariance; without
// down-weighted points it is scipy's curve_fit with absolute_sigma=False.
import { madScale, weightedLeastSquares } from './lsq.js';

export type Loss = 'huber' | 'linear';

export interface RobustOptions {
  /** 'huber' (default) down-weights points beyond huberK robust sigmas; 'linear' is plain weighted LS. */
  loss?: Loss;
  /** Huber tuning constant in units of the robust scale; 1.345 gives 95 % efficiency at the normal
   * (Holland & Welsch 1977, common practice). */
  huberK?: number;
  /** IRLS iterations at most (default 50). */
  maxIter?: number;
  /** The parameter covariance is multiplied by this (>= 1): consecutive flux windows overlapping by a
   * factor m = window/cadence share their samples, so n windows carry about n/m independent values. */
  overlapFactor?: number;
}

export interface RobustFit {
  ok: true;
  coef: number[];
  /** Row-major p x p parameter covariance (scaled, see the file header). */
  cov: number[];
  se: number[];
  /** Robust scale of the standardised residuals r_i/sigma_i (1 when the sigmas are right). */
  scale: number;
  /** sum (r/sigma)^2 / (n - p). */
  reducedChi2: number;
  /** Final robustness weights in (0, 1] (all 1 for the linear loss). */
  robustWeights: Float64Array;
  residuals: Float64Array;
  n: number;
  iterations: number;
}

export type RobustFitResult = RobustFit | { ok: false; reason: string };

/** Huber weight psi(u)/u for a standardised residual u and threshold k. */
export function huberWeight(u: number, k: number): number {
  const a = Math.abs(u);
  return a <= k ? 1 : k / a;
}

/** Robustness weights for residuals r with sigmas s: Huber on r/(s * scale), scale = normalised MAD of r/s.
 * A scale of zero (an exact fit) leaves every weight at 1. */
export function huberWeights(
  residuals: ArrayLike<number>,
  sigma: ArrayLike<number>,
  k: number,
): { weights: Float64Array; scale: number } {
  const n = residuals.length;
  const z = new Float64Array(n);
  for (let i = 0; i < n; i++) z[i] = (residuals[i] as number) / (sigma[i] as number);
  const scale = madScale(z);
  const weights = new Float64Array(n).fill(1);
  if (scale > 0) for (let i = 0; i < n; i++) weights[i] = huberWeight((z[i] as number) / scale, k);
  return { weights, scale };
}

/**
 * Parameter covariance of the fit, from covBase = (J^T W0 J)^-1 with the base weights W0 = 1/sigma^2 and the
 * standardised residuals z = r/sigma.
 * - linear loss: covBase sum z^2/(n - p), the reduced-chi-square scaling of curve_fit (absolute_sigma=False);
 * - Huber loss: Huber's (1981, Robust Statistics, 7.6) asymptotic M-estimator covariance in the form
 *   K^2 s^2 [sum psi(u)^2/(n - p)] / mean(psi'(u))^2 covBase, u = z/s, K = 1 + (p/n) var(psi')/mean(psi')^2,
 *   which reduces to the linear case when no point is down-weighted (the 'H1' form of common robust
 *   regression software).
 * Both times the overlap factor.
 */
export function fitCovariance(
  covBase: ArrayLike<number>,
  z: ArrayLike<number>,
  p: number,
  o: { loss: Loss; huberK: number; scale: number; overlapFactor: number },
): { cov: number[]; se: number[]; reducedChi2: number } {
  const n = z.length;
  let sz2 = 0;
  for (let i = 0; i < n; i++) sz2 += (z[i] as number) ** 2;
  const reducedChi2 = n > p ? sz2 / (n - p) : NaN;
  let factor = reducedChi2;
  if (o.loss === 'huber' && o.scale > 0) {
    let spsi2 = 0;
    let inside = 0;
    for (let i = 0; i < n; i++) {
      const u = (z[i] as number) / o.scale;
      const psi = Math.max(-o.huberK, Math.min(o.huberK, u));
      spsi2 += psi * psi;
      if (Math.abs(u) <= o.huberK) inside++;
    }
    const m = inside / n;
    const K = 1 + ((p / n) * (1 - m)) / m;
    factor = m > 0 && n > p ? (K * K * o.scale * o.scale * (spsi2 / (n - p))) / (m * m) : NaN;
  }
  const f = factor * Math.max(1, o.overlapFactor);
  const cov = Array.from(covBase, (c) => c * f);
  const se = Array.from({ length: p }, (_, i) => Math.sqrt(Math.max(0, cov[i * p + i] as number)));
  return { cov, se, reducedChi2 };
}

/**
 * Robust weighted linear fit y ~ X b with per-point sigmas. Check (analytic): exact y = 1 + 2 x with one
 * point moved by 100 sigma recovers [1, 2] to 1e-6 with the Huber loss, while the linear loss does not.
 */
export function robustLinearFit(
  rows: ReadonlyArray<ArrayLike<number>>,
  y: ArrayLike<number>,
  sigma: ArrayLike<number>,
  options: RobustOptions = {},
): RobustFitResult {
  const n = rows.length;
  const k = options.huberK ?? 1.345;
  const maxIter = options.maxIter ?? 50;
  const robust = (options.loss ?? 'huber') === 'huber';
  const base = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = sigma[i] as number;
    if (!(s > 0) || !Number.isFinite(s)) return { ok: false, reason: `sigma[${i}] = ${s} is not positive` };
    base[i] = 1 / (s * s);
  }
  let rw: Float64Array = new Float64Array(n).fill(1);
  let scale = 1;
  const w = new Float64Array(n);
  let prev: number[] | undefined;
  for (let it = 1; it <= maxIter; it++) {
    for (let i = 0; i < n; i++) w[i] = (base[i] as number) * (rw[i] as number);
    const fit = weightedLeastSquares(rows, y, w);
    if (!fit.ok) return { ok: false, reason: fit.reason };
    const converged =
      prev !== undefined &&
      fit.coef.every((c, j) => Math.abs(c - (prev as number[])[j]!) <= 1e-10 * (Math.abs(c) + 1e-12));
    if (!robust || converged || it === maxIter) {
      const p = fit.p;
      const z = Float64Array.from(fit.residuals, (r, i) => r / (sigma[i] as number));
      if (!robust) scale = huberWeights(fit.residuals, sigma, k).scale;
      const baseFit = robust ? weightedLeastSquares(rows, y, base) : fit;
      if (!baseFit.ok) return { ok: false, reason: baseFit.reason };
      const c = fitCovariance(baseFit.covUnscaled, z, p, {
        loss: robust ? 'huber' : 'linear',
        huberK: k,
        scale,
        overlapFactor: options.overlapFactor ?? 1,
      });
      return {
        ok: true,
        coef: fit.coef,
        cov: c.cov,
        se: c.se,
        scale,
        reducedChi2: c.reducedChi2,
        robustWeights: rw,
        residuals: fit.residuals,
        n,
        iterations: it,
      };
    }
    prev = fit.coef;
    const hw = huberWeights(fit.residuals, sigma, k);
    rw = hw.weights;
    scale = hw.scale;
  }
  return { ok: false, reason: 'no convergence' };
}
