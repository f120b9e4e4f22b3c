// Burst preparation (docs/methods/waves.md 4.1): gap filling, pressure to head
// (docs/methods/seawater.md 2.2), least-squares polynomial detrending, and despiking with the Hampel (1974,
// J. Am. Stat. Assoc.) identifier, sigma_r = 1.4826 MAD.

/**
 * Copies x into out, replacing null and non-finite samples by linear interpolation between the nearest finite
 * neighbours (nearest finite value at the ends). Returns the count of non-finite samples, or -1 if none is
 * finite.
 */
export function fillGaps(x: ArrayLike<number | null>, out: Float64Array, n: number): number {
  let bad = 0;
  let last = -1; // index of the last finite sample
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (typeof v === 'number' && Number.isFinite(v)) {
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

/**
 * Rearranges buf[left..right] so that buf[k] is the value a full sort would put there, everything before it
 * is <= buf[k] and everything after it >= buf[k]; returns buf[k]. Floyd & Rivest (1975), Commun. ACM 18,
 * 165-172 (Algorithm 489, SELECT): sampling narrows the range first, so it takes about n + min(k, n-k)
 * comparisons against quickselect's ~3.4 n (a third of the despike cost on a 2048-sample burst).
 */
export function selectKth(buf: Float64Array, k: number, left = 0, right = buf.length - 1): number {
  while (right > left) {
    if (right - left > 600) {
      const n = right - left + 1;
      const m = k - left + 1;
      const z = Math.log(n);
      const s = 0.5 * Math.exp((2 * z) / 3);
      const sd = 0.5 * Math.sqrt((z * s * (n - s)) / n) * (m - n / 2 < 0 ? -1 : 1);
      const newLeft = Math.max(left, Math.floor(k - (m * s) / n + sd));
      const newRight = Math.min(right, Math.floor(k + ((n - m) * s) / n + sd));
      selectKth(buf, k, newLeft, newRight);
    }
    const t = buf[k] as number;
    let i = left;
    let j = right;
    swap(buf, left, k);
    if ((buf[right] as number) > t) swap(buf, left, right);
    while (i < j) {
      swap(buf, i, j);
      i++;
      j--;
      while ((buf[i] as number) < t) i++;
      while ((buf[j] as number) > t) j--;
    }
    if ((buf[left] as number) === t) swap(buf, left, j);
    else {
      j++;
      swap(buf, j, right);
    }
    if (j <= k) left = j + 1;
    if (k <= j) right = j - 1;
  }
  return buf[k] as number;
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i] as number;
  a[i] = a[j] as number;
  a[j] = t;
}

/** Median of x[0..n) using scratch (length >= n). Even n: mean of the two middle values. */
export function median(x: Float64Array, n: number, scratch: Float64Array): number {
  for (let i = 0; i < n; i++) scratch[i] = x[i] as number;
  return medianInPlace(scratch, n);
}

/** Median of buf[0..n), reordering buf. */
export function medianInPlace(buf: Float64Array, n: number): number {
  const hiMid = selectKth(buf, n >> 1, 0, n - 1);
  if (n % 2 === 1) return hiMid;
  // after selection every element left of n/2 is <= hiMid: the lower middle is their maximum
  let loMid = -Infinity;
  for (let i = 0; i < n >> 1; i++) if ((buf[i] as number) > loMid) loMid = buf[i] as number;
  return 0.5 * (loMid + hiMid);
}

/**
 * Hampel despike in place: samples with |x - median| > nSigma sigma_r, sigma_r = 1.4826 MAD (1.4826 makes
 * the MAD a consistent estimator of a normal sigma, Hampel 1974), are replaced by linear interpolation
 * between the nearest kept neighbours. sigma_r is floored at floorSigma so that a quantized, nearly flat
 * record (MAD = 0) does not turn every non-median sample into a "spike". Two scratch arrays of length >= n.
 * Returns the number replaced.
 */
export function despike(
  x: Float64Array,
  n: number,
  nSigma: number,
  floorSigma: number,
  scratch: Float64Array,
  scratch2: Float64Array,
): number {
  const med = median(x, n, scratch);
  let maxDev = 0;
  for (let i = 0; i < n; i++) {
    const d = Math.abs((x[i] as number) - med);
    scratch2[i] = d;
    if (d > maxDev) maxDev = d;
  }
  // Shortcut, exact: if MAD >= t = maxDev/(nSigma 1.4826) no sample can exceed the limit, and MAD >= t holds
  // when at most floor((n-1)/2) deviations are below t (then the lower middle order statistic is >= t).
  // One counting pass replaces the second selection for the usual burst without spikes.
  const t = (maxDev / (nSigma * 1.4826)) * (1 + 1e-12);
  let below = 0;
  for (let i = 0; i < n; i++) if ((scratch2[i] as number) < t) below++;
  if (below <= (n - 1) >> 1) return 0;
  const mad = medianInPlace(scratch2, n);
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
