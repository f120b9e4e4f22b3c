// Robust weighted least squares by iteratively reweighted least squares (Holland & Welsch 1977, Commun. Stat.
// 6, 813), on residuals standardised by each point's own sigma and a robust scale (normalised MAD, Hampel
// 1974): Huber's monotone M-estimator (Huber 1964, Ann. Math. Stat. 35, 73) and, for data where a large share
// of points can be off (whole anomalous nights), Tukey's redescending biweight (Beaton & Tukey 1974,
// Technometrics 16, 147), started from the Huber solution as it needs a good start. docs/methods/daily.md 10.3.
//
// Covariance convention (stated so the reference suite can compare like with like): see fitCovariance; without
// down-weighted points it is scipy's curve_fit with absolute_sigma=False.
import { madScale, weightedLeastSquares } from './lsq.js';

export type Loss = 'huber' | 'tukey' | 'linear';

export interface RobustOptions {
  /** 'huber' (default) down-weights points beyond huberK robust sigmas; 'tukey' then rejects points beyond
   * tukeyC robust sigmas; 'linear' is plain weighted LS. */
  loss?: Loss;
  /** Huber tuning constant in units of the robust scale; 1.345 gives 95 % efficiency at the normal
   * (Holland & Welsch 1977, common practice). */
  huberK?: number;
  /** Tukey biweight constant; 4.685 gives 95 % efficiency at the normal (common practice). */
  tukeyC?: number;
  /** IRLS iterations at most per stage (default 50). */
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
  /** Final robustness weights in [0, 1] (all 1 for the linear loss). */
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

/** Tukey biweight psi(u)/u = (1 - (u/c)^2)^2 inside c, 0 outside. */
export function tukeyWeight(u: number, c: number): number {
  const x = u / c;
  return Math.abs(x) < 1 ? (1 - x * x) ** 2 : 0;
}

/** Robustness weights for residuals r with sigmas s: Huber (or Tukey) on r/(s * scale), scale = normalised
 * MAD of r/s. A scale of zero (an exact fit) leaves every weight at 1. */
export function huberWeights(
  residuals: ArrayLike<number>,
  sigma: ArrayLike<number>,
  k: number,
  loss: 'huber' | 'tukey' = 'huber',
): { weights: Float64Array; scale: number } {
  const n = residuals.length;
  const z = new Float64Array(n);
  for (let i = 0; i < n; i++) z[i] = (residuals[i] as number) / (sigma[i] as number);
  const scale = madScale(z);
  const weights = new Float64Array(n).fill(1);
  const wf = loss === 'tukey' ? tukeyWeight : huberWeight;
  if (scale > 0) for (let i = 0; i < n; i++) weights[i] = wf((z[i] as number) / scale, k);
  return { weights, scale };
}

/** psi(u) and psi'(u) of a loss. */
function psi(loss: Loss, u: number, k: number, c: number): [number, number] {
  if (loss === 'huber') return Math.abs(u) <= k ? [u, 1] : [Math.sign(u) * k, 0];
  if (loss === 'tukey') {
    const x = u / c;
    if (Math.abs(x) >= 1) return [0, 0];
    return [u * (1 - x * x) ** 2, (1 - x * x) * (1 - 5 * x * x)];
  }
  return [u, 1];
}

/**
 * Parameter covariance of the fit, from covBase = (J^T W0 J)^-1 with the base weights W0 = 1/sigma^2 and the
 * standardised residuals z = r/sigma.
 * - linear loss: covBase sum z^2/(n - p), the reduced-chi-square scaling of curve_fit (absolute_sigma=False);
 * - Huber and Tukey: Huber's (1981, Robust Statistics, 7.6) asymptotic M-estimator covariance in the form
 *   K^2 s^2 [sum psi(u)^2/(n - p)] / mean(psi'(u))^2 covBase, u = z/s, K = 1 + (p/n) var(psi')/mean(psi')^2,
 *   which for Huber reduces to the linear case when no point is down-weighted (the 'H1' form of common
 *   robust regression software).
 * Both times the overlap factor.
 */
export function fitCovariance(
  covBase: ArrayLike<number>,
  z: ArrayLike<number>,
  p: number,
  o: { loss: Loss; huberK: number; tukeyC?: number; scale: number; overlapFactor: number },
): { cov: number[]; se: number[]; reducedChi2: number } {
  const n = z.length;
  let sz2 = 0;
  for (let i = 0; i < n; i++) sz2 += (z[i] as number) ** 2;
  const reducedChi2 = n > p ? sz2 / (n - p) : NaN;
  let factor = reducedChi2;
  if (o.loss !== 'linear' && o.scale > 0) {
    let spsi2 = 0;
    let sd1 = 0;
    let sd2 = 0;
    for (let i = 0; i < n; i++) {
      const [ps, d] = psi(o.loss, (z[i] as number) / o.scale, o.huberK, o.tukeyC ?? 4.685);
      spsi2 += ps * ps;
      sd1 += d;
      sd2 += d * d;
    }
    const m = sd1 / n;
    const varD = Math.max(0, sd2 / n - m * m);
    const K = 1 + (p / n) * (varD / (m * m));
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
  const c = options.tukeyC ?? 4.685;
  const maxIter = options.maxIter ?? 50;
  const loss = options.loss ?? 'huber';
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
  // Stages: plain least squares, then Huber to convergence, then (for 'tukey') the biweight from there.
  let stage: Loss = loss === 'linear' ? 'linear' : 'huber';
  let iterations = 0;
  for (let it = 1; it <= 2 * maxIter; it++) {
    iterations = it;
    for (let i = 0; i < n; i++) w[i] = (base[i] as number) * (rw[i] as number);
    const fit = weightedLeastSquares(rows, y, w);
    if (!fit.ok) return { ok: false, reason: fit.reason };
    const converged =
      prev !== undefined &&
      fit.coef.every((x, j) => Math.abs(x - (prev as number[])[j]!) <= 1e-10 * (Math.abs(x) + 1e-12));
    if (stage === 'huber' && loss === 'tukey' && (converged || it === maxIter)) {
      stage = 'tukey';
      prev = undefined;
    } else if (stage === 'linear' || converged || it === 2 * maxIter) {
      return finishLinear(rows, y, sigma, base, fit, rw, { loss, k, c, scale, iterations, options });
    } else prev = fit.coef;
    const hw = huberWeights(
      fit.residuals,
      sigma,
      stage === 'tukey' ? c : k,
      stage === 'tukey' ? 'tukey' : 'huber',
    );
    rw = hw.weights;
    scale = hw.scale;
  }
  return { ok: false, reason: 'no convergence' };
}

function finishLinear(
  rows: ReadonlyArray<ArrayLike<number>>,
  y: ArrayLike<number>,
  sigma: ArrayLike<number>,
  base: Float64Array,
  fit: { coef: number[]; residuals: Float64Array; p: number; covUnscaled: number[] },
  rw: Float64Array,
  o: { loss: Loss; k: number; c: number; scale: number; iterations: number; options: RobustOptions },
): RobustFitResult {
  const n = rows.length;
  const z = Float64Array.from(fit.residuals, (r, i) => r / (sigma[i] as number));
  const scale = o.loss === 'linear' ? huberWeights(fit.residuals, sigma, o.k).scale : o.scale;
  const baseFit = o.loss === 'linear' ? fit : weightedLeastSquares(rows, y, base);
  if (!('coef' in baseFit)) return { ok: false, reason: baseFit.reason };
  const cv = fitCovariance(baseFit.covUnscaled, z, fit.p, {
    loss: o.loss,
    huberK: o.k,
    tukeyC: o.c,
    scale,
    overlapFactor: o.options.overlapFactor ?? 1,
  });
  return {
    ok: true,
    coef: fit.coef,
    cov: cv.cov,
    se: cv.se,
    scale,
    reducedChi2: cv.reducedChi2,
    robustWeights: rw,
    residuals: fit.residuals,
    n,
    iterations: o.iterations,
  };
}
