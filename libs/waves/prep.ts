// Burst preparation (science.md 4.1): gap filling, pressure to head (2.2), least-squares polynomial
// detrending, and despiking with the Hampel (1974, J. Am. Stat. Assoc.) identifier, sigma_r = 1.4826 MAD.

/**
 * Copies x into out, replacing non-finite samples by linear interpolation between the nearest finite
 * neighbours (nearest finite value at the ends). Returns the count of non-finite samples, or -1 if none is
 * finite.
 */
export function fillGaps(x: ArrayLike<number>, out: Float64Array, n: number): number {
  let bad = 0;
  let last = -1; // index of the last finite sample
  for (let i = 0; i < n; i++) {
    const v = x[i] as number;
    if (Number.isFinite(v)) {
      if (last < i - 1) {
        const gapStart = last + 1;
        const right = v;
        const left = last >= 0 ? (out[last] as number) : right;
        const span = i - last;
        for (let j = gapStart; j < i; j++)
          out[j] = last >= 0 ? left + ((right - left) * (j - last)) / span : right;
      }
      out[i] = v;
      last = i;
    } else {
      bad++;
    }
  }
  if (last < 0) return -1;
  for (let j = last + 1; j < n; j++) out[j] = out[last] as number;
  return bad;
}

/**
 * Least-squares polynomial detrend in place, order 1 (linear) or 2 (quadratic), on the normalized time
 * u = 2 n/(N-1) - 1 for conditioning. Returns nothing; x becomes the residual, whose mean is 0.
 */
export function detrend(x: Float64Array, n: number, order: 1 | 2): void {
  if (n < 3) {
    let m = 0;
    for (let i = 0; i < n; i++) m += x[i] as number;
    m /= n;
    for (let i = 0; i < n; i++) x[i] = (x[i] as number) - m;
    return;
  }
  // normal equations in the monomials 1, u, u^2 (3 x 3 at most), solved by Cramer's rule
  let s0 = 0,
    s1 = 0,
    s2 = 0,
    s3 = 0,
    s4 = 0,
    t0 = 0,
    t1 = 0,
    t2 = 0;
  const c = 2 / (n - 1);
  for (let i = 0; i < n; i++) {
    const u = i * c - 1;
    const u2 = u * u;
    const v = x[i] as number;
    s0 += 1;
    s1 += u;
    s2 += u2;
    s3 += u2 * u;
    s4 += u2 * u2;
    t0 += v;
    t1 += v * u;
    t2 += v * u2;
  }
  let a0: number, a1: number, a2: number;
  if (order === 1) {
    const det = s0 * s2 - s1 * s1;
    a0 = (t0 * s2 - s1 * t1) / det;
    a1 = (s0 * t1 - s1 * t0) / det;
    a2 = 0;
  } else {
    const det = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
    a0 = (t0 * (s2 * s4 - s3 * s3) - s1 * (t1 * s4 - s3 * t2) + s2 * (t1 * s3 - s2 * t2)) / det;
    a1 = (s0 * (t1 * s4 - t2 * s3) - t0 * (s1 * s4 - s3 * s2) + s2 * (s1 * t2 - t1 * s2)) / det;
    a2 = (s0 * (s2 * t2 - s3 * t1) - s1 * (s1 * t2 - s2 * t1) + t0 * (s1 * s3 - s2 * s2)) / det;
  }
  for (let i = 0; i < n; i++) {
    const u = i * c - 1;
    x[i] = (x[i] as number) - (a0 + u * (a1 + u * a2));
  }
}

/** k-th smallest (0-based) of buf[0..n), reordering buf (Hoare's quickselect, median-of-three pivot). */
export function selectKth(buf: Float64Array, n: number, k: number): number {
  let lo = 0;
  let hi = n - 1;
  while (hi > lo) {
    const mid = (lo + hi) >>> 1;
    const a = buf[lo] as number;
    const b = buf[mid] as number;
    const cc = buf[hi] as number;
    const pivot = a < b ? (b < cc ? b : a < cc ? cc : a) : a < cc ? a : b < cc ? cc : b;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while ((buf[i] as number) < pivot) i++;
      while ((buf[j] as number) > pivot) j--;
      if (i <= j) {
        const t = buf[i] as number;
        buf[i] = buf[j] as number;
        buf[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return buf[k] as number;
  }
  return buf[k] as number;
}

/** Median of x[0..n) using scratch (length >= n). Even n: mean of the two middle values. */
export function median(x: Float64Array, n: number, scratch: Float64Array): number {
  for (let i = 0; i < n; i++) scratch[i] = x[i] as number;
  const hiMid = selectKth(scratch, n, n >> 1);
  if (n % 2 === 1) return hiMid;
  // after selection every element left of n/2 is <= hiMid: the lower middle is their maximum
  let loMid = -Infinity;
  for (let i = 0; i < n >> 1; i++) if ((scratch[i] as number) > loMid) loMid = scratch[i] as number;
  return 0.5 * (loMid + hiMid);
}

/**
 * Hampel despike in place: samples with |x - median| > nSigma sigma_r, sigma_r = 1.4826 MAD (1.4826 makes
 * the MAD a consistent estimator of a normal sigma, Hampel 1974), are replaced by linear interpolation
 * between the nearest kept neighbours. sigma_r is floored at floorSigma so that a quantized, nearly flat
 * record (MAD = 0) does not turn every non-median sample into a "spike". scratch needs length >= 2 n.
 * Returns the number replaced.
 */
export function despike(
  x: Float64Array,
  n: number,
  nSigma: number,
  floorSigma: number,
  scratch: Float64Array,
): number {
  const med = median(x, n, scratch);
  for (let i = 0; i < n; i++) scratch[i] = Math.abs((x[i] as number) - med);
  const mad = median(scratch, n, scratch.subarray(n));
  const limit = nSigma * Math.max(1.4826 * mad, floorSigma);
  let replaced = 0;
  let last = -1;
  for (let i = 0; i < n; i++) {
    const v = x[i] as number;
    if (Math.abs(v - med) <= limit) {
      if (last < i - 1) {
        const left = last >= 0 ? (x[last] as number) : v;
        const span = i - last;
        for (let j = last + 1; j < i; j++) x[j] = last >= 0 ? left + ((v - left) * (j - last)) / span : v;
      }
      last = i;
    } else {
      replaced++;
    }
  }
  if (last >= 0) for (let j = last + 1; j < n; j++) x[j] = x[last] as number;
  return replaced;
}
