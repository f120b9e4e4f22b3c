// Chi-square quantiles for the spectral confidence interval (4.2; Jenkins & Watts 1968): chi2_nu(p) =
// 2 P^-1(nu/2, p), with P the regularized lower incomplete gamma function. P and Q = 1 - P by the series and
// the Lentz continued fraction (the standard pair, e.g. Press et al. 2007, Numerical Recipes 3rd ed., 6.2),
// ln Gamma by the Lanczos (1964, SIAM J. Numer. Anal.) approximation, g = 7, 9 terms. The inverse starts from
// the Wilson & Hilferty (1931, Proc. Natl. Acad. Sci.) cube-root normal approximation and is refined by a
// bracketed Halley iteration to 1e-14 relative.
import { WAVES_ERRORS } from './errors.js';

const LANCZOS_G = 7;
// Lanczos coefficients for g = 7, n = 9 (common practice; the widely used set, accurate to ~1e-15).
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Gamma(x) for x > 0; relative error ~1e-15. Check: ln Gamma(0.5) = ln sqrt(pi) = 0.5723649429247001. */
export function lnGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  const z = x - 1;
  let s = LANCZOS[0] as number;
  for (let i = 1; i < LANCZOS.length; i++) s += (LANCZOS[i] as number) / (z + i);
  const t = z + LANCZOS_G + 0.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(s);
}

const EPS = 1e-16;
const TINY = 1e-300;

function seriesP(a: number, x: number, lga: number): number {
  let ap = a;
  let del = 1 / a;
  let sum = del;
  for (let n = 0; n < 1000; n++) {
    ap += 1;
    del *= x / ap;
    sum += del;
    if (Math.abs(del) < Math.abs(sum) * EPS) break;
  }
  return sum * Math.exp(-x + a * Math.log(x) - lga);
}

function contFracQ(a: number, x: number, lga: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) break;
  }
  return Math.exp(-x + a * Math.log(x) - lga) * h;
}

/** Regularized lower (P) and upper (Q) incomplete gamma functions, a > 0, x >= 0. */
export function regularizedGamma(a: number, x: number): { p: number; q: number } {
  if (x <= 0) return { p: 0, q: 1 };
  const lga = lnGamma(a);
  if (x < a + 1) {
    const p = seriesP(a, x, lga);
    return { p, q: 1 - p };
  }
  const q = contFracQ(a, x, lga);
  return { p: 1 - q, q };
}

/** Standard normal quantile, Abramowitz & Stegun (1964) 26.2.23, |error| < 4.5e-4 (a starting guess only). */
function normalQuantileRough(p: number): number {
  const pp = p < 0.5 ? p : 1 - p;
  const t = Math.sqrt(-2 * Math.log(pp));
  const z =
    t -
    (2.515517 + 0.802853 * t + 0.010328 * t * t) /
      (1 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t * t * t);
  return p < 0.5 ? -z : z;
}

/**
 * Quantile chi2_nu(p) of the chi-square distribution with nu > 0 degrees of freedom (nu need not be an
 * integer), 0 < p < 1. Relative accuracy ~1e-13. Check values (scipy.stats.chi2.ppf, in the reference
 * vectors): chi2_10(0.025) = 3.246972780236841, chi2_10(0.975) = 20.483177350807388.
 */
export function chi2Quantile(p: number, nu: number): number {
  if (!(p > 0 && p < 1) || !(nu > 0) || !Number.isFinite(nu)) {
    throw WAVES_ERRORS.error('REEFD_WAVES_CHI2_DOMAIN', `got p=${p}, nu=${nu}`);
  }
  const a = nu / 2;
  const lga = lnGamma(a);
  const upper = p > 0.5;
  const target = upper ? 1 - p : p;
  // Wilson-Hilferty: chi2 ~ nu (1 - 2/(9 nu) + z sqrt(2/(9 nu)))^3
  const c = 2 / (9 * nu);
  let x = nu * Math.pow(Math.max(1 - c + normalQuantileRough(p) * Math.sqrt(c), 0.05), 3);
  // F(x) = P(a, x/2) - p (or Q - (1 - p)); bracket [lo, hi] keeps the iteration safe at small nu.
  let lo = 0;
  let hi = Infinity;
  for (let i = 0; i < 200; i++) {
    const { p: pp, q: qq } = regularizedGamma(a, x / 2);
    const f = upper ? target - qq : pp - target; // increasing in x in both cases
    if (f > 0) hi = x;
    else lo = x;
    const pdf = Math.exp((a - 1) * Math.log(x / 2) - x / 2 - lga) / 2;
    // Halley: dx = f/f' / (1 - f f''/(2 f'^2)), f''/f' = (a - 1)/x - 1/2
    const r = f / pdf;
    let dx = r / (1 - 0.5 * r * ((a - 1) / x - 0.5));
    if (!Number.isFinite(dx)) dx = r;
    let xn = x - dx;
    if (!(xn > lo && xn < hi)) xn = hi === Infinity ? 2 * Math.max(x, lo) : 0.5 * (lo + hi);
    if (Math.abs(xn - x) <= 1e-14 * xn) return xn;
    x = xn;
  }
  return x;
}
