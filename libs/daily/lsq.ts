// Weighted linear least squares by Householder QR (Golub & Van Loan 2013, Matrix Computations, 4th ed.,
// 5.2 and 5.3): the weighted design sqrt(w) X is factored, never X^T W X, so close tidal frequencies and
// nearly collinear regressors lose half as many digits as the normal equations would (docs/methods/daily.md
// 10.3). Small dense problems only (p up to a few dozen columns, n up to some thousands of rows).

export interface LinearLsq {
  ok: true;
  /** Coefficients b minimising sum w_i (y_i - x_i b)^2. */
  coef: number[];
  /** (X^T W X)^-1, row-major p x p: the covariance of b when the weights are 1/sigma^2 of known sigmas. */
  covUnscaled: number[];
  /** Residuals y - X b (unweighted). */
  residuals: Float64Array;
  /** sum w_i r_i^2. */
  chi2: number;
  n: number;
  p: number;
}

export type LinearLsqResult =
  LinearLsq | { ok: false; reason: 'too_few_rows' | 'rank_deficient' | 'non_finite' };

/** Relative size of a diagonal element of R below which a column counts as dependent. */
const RANK_TOL = 1e-11;

/**
 * Solves min sum w_i (y_i - sum_j X_ij b_j)^2. X is given row by row (n rows of p numbers); w defaults to 1.
 * Check (analytic): y = 2 + 3 x sampled exactly gives b = [2, 3] to rounding and zero residuals.
 */
export function weightedLeastSquares(
  rows: ReadonlyArray<ArrayLike<number>>,
  y: ArrayLike<number>,
  w?: ArrayLike<number>,
): LinearLsqResult {
  const n = rows.length;
  const p = n > 0 ? (rows[0] as ArrayLike<number>).length : 0;
  if (n < p || p === 0) return { ok: false, reason: 'too_few_rows' };
  // Column-major copy of sqrt(w) X and sqrt(w) y.
  const a = new Float64Array(n * p);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const sw = Math.sqrt(w === undefined ? 1 : (w[i] as number));
    const row = rows[i] as ArrayLike<number>;
    for (let j = 0; j < p; j++) a[j * n + i] = sw * (row[j] as number);
    b[i] = sw * (y[i] as number);
  }
  for (let k = 0; k < a.length; k++)
    if (!Number.isFinite(a[k] as number)) return { ok: false, reason: 'non_finite' };
  for (let i = 0; i < n; i++)
    if (!Number.isFinite(b[i] as number)) return { ok: false, reason: 'non_finite' };

  const rDiag = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    // Householder vector for column j, rows j..n-1.
    let norm = 0;
    for (let i = j; i < n; i++) norm = Math.hypot(norm, a[j * n + i] as number);
    const ajj = a[j * n + j] as number;
    const alpha = ajj > 0 ? -norm : norm;
    rDiag[j] = alpha;
    if (norm === 0) continue;
    a[j * n + j] = ajj - alpha;
    let vnorm2 = 0;
    for (let i = j; i < n; i++) vnorm2 += (a[j * n + i] as number) ** 2;
    if (vnorm2 === 0) continue;
    // Apply H = I - 2 v v^T / (v^T v) to the remaining columns and to b.
    for (let k = j + 1; k < p; k++) {
      let s = 0;
      for (let i = j; i < n; i++) s += (a[j * n + i] as number) * (a[k * n + i] as number);
      const f = (2 * s) / vnorm2;
      for (let i = j; i < n; i++) a[k * n + i] = (a[k * n + i] as number) - f * (a[j * n + i] as number);
    }
    let s = 0;
    for (let i = j; i < n; i++) s += (a[j * n + i] as number) * (b[i] as number);
    const f = (2 * s) / vnorm2;
    for (let i = j; i < n; i++) b[i] = (b[i] as number) - f * (a[j * n + i] as number);
  }
  let maxDiag = 0;
  for (let j = 0; j < p; j++) maxDiag = Math.max(maxDiag, Math.abs(rDiag[j] as number));
  for (let j = 0; j < p; j++) {
    if (!(Math.abs(rDiag[j] as number) > RANK_TOL * maxDiag)) return { ok: false, reason: 'rank_deficient' };
  }
  // R (upper triangle): diagonal in rDiag, above the diagonal in a[k n + j] for k > j.
  const R = (i: number, k: number) => (i === k ? (rDiag[i] as number) : (a[k * n + i] as number));
  const coef = new Array<number>(p).fill(0);
  for (let i = p - 1; i >= 0; i--) {
    let s = b[i] as number;
    for (let k = i + 1; k < p; k++) s -= R(i, k) * (coef[k] as number);
    coef[i] = s / R(i, i);
  }
  // Rinv (upper triangular), then cov = Rinv Rinv^T.
  const rinv = new Float64Array(p * p);
  for (let c = 0; c < p; c++) {
    rinv[c * p + c] = 1 / R(c, c);
    for (let i = c - 1; i >= 0; i--) {
      let s = 0;
      for (let k = i + 1; k <= c; k++) s += R(i, k) * (rinv[k * p + c] as number);
      rinv[i * p + c] = -s / R(i, i);
    }
  }
  const cov = new Array<number>(p * p).fill(0);
  for (let i = 0; i < p; i++) {
    for (let j = i; j < p; j++) {
      let s = 0;
      for (let k = Math.max(i, j); k < p; k++) s += (rinv[i * p + k] as number) * (rinv[j * p + k] as number);
      cov[i * p + j] = s;
      cov[j * p + i] = s;
    }
  }
  const residuals = new Float64Array(n);
  let chi2 = 0;
  for (let i = 0; i < n; i++) {
    const row = rows[i] as ArrayLike<number>;
    let fit = 0;
    for (let j = 0; j < p; j++) fit += (row[j] as number) * (coef[j] as number);
    const r = (y[i] as number) - fit;
    residuals[i] = r;
    chi2 += (w === undefined ? 1 : (w[i] as number)) * r * r;
  }
  return { ok: true, coef, covUnscaled: cov, residuals, chi2, n, p };
}

/** Inverse of a small symmetric positive-definite matrix (row-major), by Cholesky; undefined if not SPD. */
export function invertSpd(m: ArrayLike<number>, p: number): number[] | undefined {
  const l = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = m[i * p + j] as number;
      for (let k = 0; k < j; k++) s -= (l[i * p + k] as number) * (l[j * p + k] as number);
      if (i === j) {
        if (!(s > 0)) return undefined;
        l[i * p + i] = Math.sqrt(s);
      } else l[i * p + j] = s / (l[j * p + j] as number);
    }
  }
  // inv(L), then inv(M) = inv(L)^T inv(L).
  const li = new Float64Array(p * p);
  for (let c = 0; c < p; c++) {
    li[c * p + c] = 1 / (l[c * p + c] as number);
    for (let i = c + 1; i < p; i++) {
      let s = 0;
      for (let k = c; k < i; k++) s += (l[i * p + k] as number) * (li[k * p + c] as number);
      li[i * p + c] = -s / (l[i * p + i] as number);
    }
  }
  const out = new Array<number>(p * p).fill(0);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let k = Math.max(i, j); k < p; k++) s += (li[k * p + i] as number) * (li[k * p + j] as number);
      out[i * p + j] = s;
    }
  }
  return out;
}

/** Median of a copy of xs (NaN for an empty list). */
export function median(xs: ArrayLike<number>): number {
  const s = Float64Array.from(xs).sort();
  const n = s.length;
  if (n === 0) return NaN;
  return n % 2 === 1 ? (s[(n - 1) / 2] as number) : 0.5 * ((s[n / 2 - 1] as number) + (s[n / 2] as number));
}

/** Normalised median absolute deviation about the median: 1.4826 MAD estimates a normal sigma
 * (Hampel 1974; the factor 1/Phi^-1(3/4) = 1.4826, common practice). */
export function madScale(xs: ArrayLike<number>): number {
  const m = median(xs);
  const dev = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) dev[i] = Math.abs((xs[i] as number) - m);
  return 1.4826 * median(dev);
}
