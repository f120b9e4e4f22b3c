// Deterministic ensembles (docs/methods/forecast.md 11.6): quasi-random normal deviates from the Halton
// sequence (Halton 1960, Numer. Math. 2, 84) through the inverse normal distribution, in antithetic pairs,
// so a forecast needs no random-number generator and repeats exactly in replay. Inverse normal: Acklam's rational approximation
// (relative error < 1.15e-9) with one Halley step, common practice.

const PRIMES = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37];

/** The i-th (i >= 1) element of the van der Corput sequence in base b, in (0, 1). */
export function vanDerCorput(i: number, base: number): number {
  let f = 1;
  let r = 0;
  let n = i;
  while (n > 0) {
    f /= base;
    r += f * (n % base);
    n = Math.floor(n / base);
  }
  return r;
}

/** Standard normal cumulative distribution (erfc by the Numerical Recipes Chebyshev fit, |error| < 1.2e-7). */
export function normalCdf(x: number): number {
  const z = Math.abs(x) / Math.SQRT2;
  const t = 1 / (1 + 0.5 * z);
  const erfc =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t *
          (1.00002368 +
            t *
              (0.37409196 +
                t *
                  (0.09678418 +
                    t *
                      (-0.18628806 +
                        t *
                          (0.27886807 +
                            t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? 1 - 0.5 * erfc : 0.5 * erfc;
}

/** Inverse of the standard normal distribution. Check: p = 0.9 gives 1.2815516 (common practice). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) return p === 0 ? -Infinity : p === 1 ? Infinity : NaN;
  const a = [
    -39.69683028665376, 220.9460984245205, -275.9285104469687, 138.357751867269, -30.66479806614716,
    2.506628277459239,
  ];
  const b = [
    -54.47609879822406, 161.5858368580409, -155.6989798598866, 66.80131188771972, -13.28068155288572,
  ];
  const c = [
    -0.007784894002430293, -0.3223964580411365, -2.400758277161838, -2.549732539343734, 4.374664141464968,
    2.938163982698783,
  ];
  const d = [0.007784695709041462, 0.3224671290700398, 2.445134137142996, 3.754408661907416];
  const pl = 0.02425;
  let x: number;
  if (p < pl) {
    const q = Math.sqrt(-2 * Math.log(p));
    x =
      (((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) /
      ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1);
  } else if (p <= 1 - pl) {
    const q = p - 0.5;
    const r = q * q;
    x =
      ((((((a[0]! * r + a[1]!) * r + a[2]!) * r + a[3]!) * r + a[4]!) * r + a[5]!) * q) /
      (((((b[0]! * r + b[1]!) * r + b[2]!) * r + b[3]!) * r + b[4]!) * r + 1);
  } else {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    x =
      -(((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) /
      ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1);
  }
  // One Halley step on the cdf sharpens the approximation.
  const e = normalCdf(x) - p;
  const u = e * Math.sqrt(2 * Math.PI) * Math.exp((x * x) / 2);
  return x - u / (1 + (x * u) / 2);
}

/** n members x dims standard normal deviates (member-major): Halton points 1..n/2 and their mirror images
 * (antithetic pairs), so every dimension has a mean of exactly zero and no odd moments. */
export function haltonNormals(n: number, dims: number): Float64Array {
  if (dims > PRIMES.length) throw new RangeError(`at most ${PRIMES.length} dimensions`);
  const z = new Float64Array(n * dims);
  const half = Math.ceil(n / 2);
  for (let i = 0; i < half; i++) {
    for (let d = 0; d < dims; d++) {
      const x = normalQuantile(vanDerCorput(i + 1, PRIMES[d] as number));
      z[i * dims + d] = x;
      if (half + i < n) z[(half + i) * dims + d] = -x;
    }
  }
  return z;
}

/** The q-quantile of xs (linear interpolation between order statistics, numpy's default). */
export function quantile(xs: ArrayLike<number>, q: number): number {
  const s = Float64Array.from(xs).sort();
  const n = s.length;
  if (n === 0) return NaN;
  const pos = q * (n - 1);
  const i = Math.floor(pos);
  const f = pos - i;
  return i + 1 < n ? (s[i] as number) * (1 - f) + (s[i + 1] as number) * f : (s[n - 1] as number);
}
