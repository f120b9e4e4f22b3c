// Robust straight-line fit y = a + b x for calibration against bottles (docs/methods/calibration.md 13.3):
// Siegel's repeated median as a start that tolerates up to half the points being outliers, then Tukey
// bisquare iteratively reweighted least squares with the start's scale held fixed (an MM-type estimate),
// and the asymptotic covariance of an M-estimator for the standard errors.
//   Siegel A.F. (1982), Biometrika 69, 242-244: robust regression using repeated medians.
//   Beaton A.E. & Tukey J.W. (1974), Technometrics 16, 147-185: the bisquare weight.
//   Huber P.J. (1981), Robust Statistics, Wiley, section 7.6: covariance of regression M-estimates,
//   with the small-sample factor K = 1 + (p/n) var(psi')/mean(psi')^2.

/** Tuning constant of the bisquare: 95 % efficiency at the normal distribution (Holland & Welsch 1977). */
export const BISQUARE_C = 4.685;
/** MAD to standard deviation at the normal distribution (common practice). */
const MAD_TO_SD = 1.4826;

export interface LineFit {
  /** Intercept and slope. */
  a: number;
  b: number;
  /** Standard errors of a and b, and their covariance. */
  seA: number;
  seB: number;
  covAB: number;
  /** Robust scale of the residuals (the fixed scale of the bisquare), in y units. */
  scale: number;
  /** Final bisquare weight of each point (0 = rejected as an outlier, 1 = full weight). */
  weights: number[];
  /** y - (a + b x) for each point. */
  residuals: number[];
  iterations: number;
}

export function median(values: readonly number[]): number {
  const s = [...values].sort((p, q) => p - q);
  const n = s.length;
  if (n === 0) return Number.NaN;
  const h = n >> 1;
  return n % 2 === 1 ? (s[h] as number) : ((s[h - 1] as number) + (s[h] as number)) / 2;
}

/** Siegel's repeated median line; with a single distinct x only the intercept is defined (b = 0). */
export function repeatedMedian(x: readonly number[], y: readonly number[]): { a: number; b: number } {
  const n = x.length;
  const inner: number[] = [];
  for (let i = 0; i < n; i++) {
    const slopes: number[] = [];
    for (let j = 0; j < n; j++) {
      const dx = (x[j] as number) - (x[i] as number);
      if (j !== i && dx !== 0) slopes.push(((y[j] as number) - (y[i] as number)) / dx);
    }
    if (slopes.length > 0) inner.push(median(slopes));
  }
  const b = inner.length > 0 ? median(inner) : 0;
  const a = median(y.map((yi, i) => yi - b * (x[i] as number)));
  return { a, b };
}

const bisquareWeight = (u: number): number => (Math.abs(u) >= 1 ? 0 : (1 - u * u) ** 2);
const psi = (u: number): number => u * bisquareWeight(u);
const psiPrime = (u: number): number => (Math.abs(u) >= 1 ? 0 : (1 - u * u) * (1 - 5 * u * u));

/** Weighted least-squares line; undefined when the weighted x has no spread. */
function weightedLine(
  x: readonly number[],
  y: readonly number[],
  w: readonly number[],
): { a: number; b: number } | undefined {
  let sw = 0;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < x.length; i++) {
    const wi = w[i] as number;
    sw += wi;
    sx += wi * (x[i] as number);
    sy += wi * (y[i] as number);
  }
  if (sw <= 0) return undefined;
  const mx = sx / sw;
  const my = sy / sw;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < x.length; i++) {
    const dx = (x[i] as number) - mx;
    sxx += (w[i] as number) * dx * dx;
    sxy += (w[i] as number) * dx * ((y[i] as number) - my);
  }
  if (!(sxx > 0)) return undefined;
  const b = sxy / sxx;
  return { a: my - b * mx, b };
}

/**
 * Fits y = a + b x robustly. Needs at least 3 points and 2 distinct x; returns undefined otherwise (the
 * caller says why). When every residual of the start is zero the scale is zero and the start is returned
 * with zero standard errors.
 */
export function robustLine(
  x: readonly number[],
  y: readonly number[],
  opts: { c?: number; maxIterations?: number } = {},
): LineFit | undefined {
  const n = x.length;
  if (n < 3 || y.length !== n) return undefined;
  if (new Set(x).size < 2) return undefined;
  const c = opts.c ?? BISQUARE_C;
  const maxIt = opts.maxIterations ?? 50;
  let { a, b } = repeatedMedian(x, y);
  const res = (aa: number, bb: number) => y.map((yi, i) => yi - (aa + bb * (x[i] as number)));
  let r = res(a, b);
  const scale = MAD_TO_SD * median(r.map(Math.abs));
  let w = r.map(() => 1);
  let it = 0;
  if (scale > 0) {
    for (; it < maxIt; it++) {
      w = r.map((ri) => bisquareWeight(ri / (c * scale)));
      const next = weightedLine(x, y, w);
      if (next === undefined) return undefined;
      const done =
        Math.abs(next.a - a) <= 1e-10 * (1 + Math.abs(a)) &&
        Math.abs(next.b - b) <= 1e-10 * (1 + Math.abs(b));
      a = next.a;
      b = next.b;
      r = res(a, b);
      if (done) break;
    }
    w = r.map((ri) => bisquareWeight(ri / (c * scale)));
  }
  const cov = covariance(x, r, scale, c);
  return {
    a,
    b,
    seA: Math.sqrt(cov.aa),
    seB: Math.sqrt(cov.bb),
    covAB: cov.ab,
    scale,
    weights: w,
    residuals: r,
    iterations: it,
  };
}

/** Huber's covariance of a regression M-estimate, with psi and psi' of the bisquare at u = r/(c s). */
function covariance(
  x: readonly number[],
  r: readonly number[],
  scale: number,
  c: number,
): { aa: number; bb: number; ab: number } {
  const n = x.length;
  const p = 2;
  if (!(scale > 0)) return { aa: 0, bb: 0, ab: 0 };
  const cs = c * scale;
  let sumPsi2 = 0;
  let sumDpsi = 0;
  let sumDpsi2 = 0;
  for (const ri of r) {
    const u = ri / cs;
    sumPsi2 += psi(u) ** 2;
    const d = psiPrime(u);
    sumDpsi += d;
    sumDpsi2 += d * d;
  }
  const mean = sumDpsi / n;
  if (!(mean > 0)) return { aa: Number.POSITIVE_INFINITY, bb: Number.POSITIVE_INFINITY, ab: 0 };
  const varD = Math.max(0, sumDpsi2 / n - mean * mean);
  const k = 1 + (p / n) * (varD / (mean * mean));
  // (c s)^2 converts psi(u) back to the units of y.
  const factor = (k * k * cs * cs * (sumPsi2 / (n - p))) / (mean * mean);
  // (X'X)^-1 for X = [1 x].
  let sx = 0;
  let sxx = 0;
  for (const xi of x) {
    sx += xi;
    sxx += xi * xi;
  }
  const det = n * sxx - sx * sx;
  return { aa: (factor * sxx) / det, bb: (factor * n) / det, ab: (-factor * sx) / det };
}

/**
 * Robust location y = a (a fit without drift): the median as the start, then the same bisquare iteration
 * and covariance as robustLine with X = [1]. Needs at least 3 points.
 */
export function robustLocation(
  y: readonly number[],
  opts: { c?: number; maxIterations?: number } = {},
): LineFit | undefined {
  const n = y.length;
  if (n < 3) return undefined;
  const c = opts.c ?? BISQUARE_C;
  let a = median(y);
  const scale = MAD_TO_SD * median(y.map((v) => Math.abs(v - a)));
  let w = y.map(() => 1);
  let it = 0;
  if (scale > 0) {
    for (; it < (opts.maxIterations ?? 50); it++) {
      w = y.map((v) => bisquareWeight((v - a) / (c * scale)));
      const sw = w.reduce((s, x) => s + x, 0);
      if (!(sw > 0)) return undefined;
      const next = y.reduce((s, v, i) => s + (w[i] as number) * v, 0) / sw;
      const done = Math.abs(next - a) <= 1e-10 * (1 + Math.abs(a));
      a = next;
      if (done) break;
    }
    w = y.map((v) => bisquareWeight((v - a) / (c * scale)));
  }
  const r = y.map((v) => v - a);
  let var0 = 0;
  if (scale > 0) {
    const cs = c * scale;
    let s2 = 0;
    let sd = 0;
    let sd2 = 0;
    for (const ri of r) {
      const u = ri / cs;
      s2 += psi(u) ** 2;
      const d = psiPrime(u);
      sd += d;
      sd2 += d * d;
    }
    const mean = sd / n;
    const k = mean > 0 ? 1 + (1 / n) * (Math.max(0, sd2 / n - mean * mean) / (mean * mean)) : Number.NaN;
    var0 = mean > 0 ? (k * k * cs * cs * (s2 / (n - 1))) / (mean * mean) / n : Number.POSITIVE_INFINITY;
  }
  return { a, b: 0, seA: Math.sqrt(var0), seB: 0, covAB: 0, scale, weights: w, residuals: r, iterations: it };
}
