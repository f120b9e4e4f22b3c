// Brent (1973), Algorithms for Minimization without Derivatives, Prentice-Hall, ch. 4: bracketed root finding
// combining bisection, the secant step and inverse quadratic interpolation (the "zero" procedure).
//
// Extension of our own: f may return +-Infinity (e.g. a carbonate solve that fails because a trial state has
// negative alkalinity); only the sign is used then and the step falls back to bisection. NaN is an error.

import type { MetabolismErrorCode } from './errors.js';

export interface BrentOptions {
  /** Absolute tolerance on x (default 1e-12 relative to |x| plus this). */
  xTol?: number;
  /** Maximum number of function evaluations inside the bracket (default 100). */
  maxIter?: number;
}

export type BrentResult =
  | { ok: true; x: number; fx: number; iterations: number }
  | { ok: false; code: MetabolismErrorCode; reason: string; iterations: number };

const EPS = 2.220446049250313e-16; // double precision machine epsilon

/**
 * Root of f in [a, b], where f(a) and f(b) have opposite signs (or one is zero).
 * Converges to |x - x*| <= 2 EPS |x| + xTol. Check value: x^3 - 2x - 5 on [2, 3] gives 2.0945514815423265
 * (the classic test equation of Wallis, used by Brent 1973) (from memory).
 */
export function brent(
  f: (x: number) => number,
  a: number,
  b: number,
  options: BrentOptions = {},
): BrentResult {
  const xTol = options.xTol ?? 1e-12;
  const maxIter = options.maxIter ?? 100;
  let fa = f(a);
  let fb = f(b);
  if (Number.isNaN(fa) || Number.isNaN(fb)) {
    return {
      ok: false,
      code: 'REEFD_METABOLISM_BAD_FUNCTION_VALUE',
      reason: 'f is NaN at an end of the bracket',
      iterations: 0,
    };
  }
  if (fa === 0) return { ok: true, x: a, fx: 0, iterations: 0 };
  if (fb === 0) return { ok: true, x: b, fx: 0, iterations: 0 };
  if (Math.sign(fa) === Math.sign(fb)) {
    return {
      ok: false,
      code: 'REEFD_METABOLISM_NO_BRACKET',
      reason: `f(${a}) = ${fa} and f(${b}) = ${fb} have the same sign`,
      iterations: 0,
    };
  }
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 1; iter <= maxIter; iter++) {
    if (Math.sign(fb) === Math.sign(fc)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    // Keep b the best estimate: |f(b)| <= |f(c)|.
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * EPS * Math.abs(b) + 0.5 * xTol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return { ok: true, x: b, fx: fb, iterations: iter };
    let useBisection = true;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb) && Number.isFinite(fa) && Number.isFinite(fc)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s; // secant
        q = 1 - s;
      } else {
        const qq = fa / fc; // inverse quadratic interpolation
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (
        Number.isFinite(p) &&
        Number.isFinite(q) &&
        2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))
      ) {
        e = d;
        d = p / q;
        useBisection = false;
      }
    }
    if (useBisection) {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
    if (Number.isNaN(fb)) {
      return {
        ok: false,
        code: 'REEFD_METABOLISM_BAD_FUNCTION_VALUE',
        reason: `f(${b}) is NaN`,
        iterations: iter,
      };
    }
  }
  return {
    ok: false,
    code: 'REEFD_METABOLISM_NO_CONVERGENCE',
    reason: `no convergence after ${maxIter} iterations`,
    iterations: maxIter,
  };
}

export type BracketedRootResult =
  | { ok: true; x: number; fx: number; iterations: number; lo: number; hi: number; doublings: number }
  | { ok: false; code: MetabolismErrorCode; reason: string; lo: number; hi: number; doublings: number };

/**
 * Root of f in the symmetric bracket [centre - halfWidth, centre + halfWidth], doubling the half width up to
 * maxDoublings times while f has the same sign at both ends (docs/methods/metabolism.md 6.5 step 4).
 */
export function brentExpanding(
  f: (x: number) => number,
  centre: number,
  halfWidth: number,
  maxDoublings: number,
  options: BrentOptions = {},
): BracketedRootResult {
  let w = halfWidth;
  let lo = centre - w;
  let hi = centre + w;
  for (let doublings = 0; ; doublings++) {
    const r = brent(f, lo, hi, options);
    if (r.ok) return { ...r, lo, hi, doublings };
    if (r.code !== 'REEFD_METABOLISM_NO_BRACKET' || doublings >= maxDoublings) {
      return { ok: false, code: r.code, reason: r.reason, lo, hi, doublings };
    }
    w *= 2;
    lo = centre - w;
    hi = centre + w;
  }
}
