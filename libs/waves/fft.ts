// Discrete Fourier transforms for the wave analysis: fft.js (radix-4, power-of-two sizes) for the Welch
// segments, and Bluestein's chirp-z algorithm (Bluestein 1970, IEEE Trans. Audio Electroacoust.; Rabiner,
// Schafer & Rader 1969) for the exact N-point DFT of a whole burst of arbitrary length N (4.5).
//
// Why Bluestein and not zero padding: padding a burst to the next power of two changes the frequency grid
// (f = m fs/M instead of m fs/N) and mixes the padded zeros into the reconstructed surface, so the filtered
// record is no longer the burst's own circular filter. Bluestein computes the same DFT as a naive sum, on the
// burst's own grid, at the cost of two power-of-two transforms of size M >= 2N - 1 per DFT. A real burst of
// even length goes through a complex DFT of half its length (realForwardEven, realInverse), which halves M;
// power-of-two bursts (the usual case) use fft.js directly. Measured (test/bench/waves.bench.ts): a
// 1800-sample burst costs about 1.8x a 2048-sample one.
import FFT from 'fft.js';

/** One cached plan per size: the fft.js twiddle tables and scratch buffers. */
interface Plan {
  readonly fft: FFT;
  readonly size: number;
  /** interleaved complex scratch, 2 * size */
  readonly a: Float64Array;
  readonly b: Float64Array;
}

/** Bluestein plan for one arbitrary length n: chirp and the transformed convolution kernel. */
interface ChirpPlan {
  readonly n: number;
  readonly m: Plan;
  /** w[j] = exp(-i pi j^2 / n), interleaved, length 2n */
  readonly w: Float64Array;
  /** FFT of the kernel conj(w) wrapped to length M, interleaved, length 2M */
  readonly kernelHat: Float64Array;
}

// Module state, deliberately: building a plan (twiddle tables, chirp, kernel FFT) costs more than the
// transform itself, and every burst of a station has the same length. The caches are private, keyed only
// by size, and hold nothing that depends on the data, so results are deterministic and independent of call
// order. They are bounded (a handful of sizes in practice; cleared past MAX_PLANS to stay bounded anyway).
const MAX_PLANS = 32;
const plans = new Map<number, Plan>();
const chirps = new Map<number, ChirpPlan>();

export function isPowerOfTwo(n: number): boolean {
  return n >= 2 && (n & (n - 1)) === 0;
}

export function nextPowerOfTwo(n: number): number {
  let m = 2;
  while (m < n) m *= 2;
  return m;
}

/** The cached fft.js plan for a power-of-two size (>= 2). */
export function planFor(size: number): Plan {
  let p = plans.get(size);
  if (p === undefined) {
    if (plans.size >= MAX_PLANS) plans.clear();
    p = { fft: new FFT(size), size, a: new Float64Array(2 * size), b: new Float64Array(2 * size) };
    plans.set(size, p);
  }
  return p;
}

/**
 * Real forward transform of x (length = plan size, power of two) into out (interleaved complex, length 2 size).
 * Only bins 0..size/2 are filled; the rest is left as fft.js leaves it. Sign convention exp(-2 pi i m n/N).
 */
export function realForward(plan: Plan, x: Float64Array, out: Float64Array): void {
  plan.fft.realTransform(out, x);
}

function chirpFor(n: number): ChirpPlan {
  let c = chirps.get(n);
  if (c === undefined) {
    if (chirps.size >= MAX_PLANS) chirps.clear();
    const mSize = nextPowerOfTwo(2 * n - 1);
    const m = planFor(mSize);
    const w = new Float64Array(2 * n);
    for (let j = 0; j < n; j++) {
      // j^2 mod 2n keeps the angle argument small and exact for large j.
      const q = (j * j) % (2 * n);
      const ang = (Math.PI * q) / n;
      w[2 * j] = Math.cos(ang);
      w[2 * j + 1] = -Math.sin(ang);
    }
    const kernel = new Float64Array(2 * mSize);
    for (let j = 0; j < n; j++) {
      const re = w[2 * j] as number;
      const im = -(w[2 * j + 1] as number);
      kernel[2 * j] = re;
      kernel[2 * j + 1] = im;
      if (j > 0) {
        kernel[2 * (mSize - j)] = re;
        kernel[2 * (mSize - j) + 1] = im;
      }
    }
    const kernelHat = new Float64Array(2 * mSize);
    m.fft.transform(kernelHat, kernel);
    c = { n, m, w, kernelHat };
    chirps.set(n, c);
  }
  return c;
}

/**
 * Exact N-point DFT of complex data (interleaved, length 2n) into out (length 2n), any n >= 1.
 * inverse = true computes (1/n) sum X_m exp(+2 pi i m j/n). Power-of-two n uses fft.js directly.
 */
export function complexDft(data: Float64Array, out: Float64Array, n: number, inverse: boolean): void {
  if (n === 1) {
    out[0] = data[0] as number;
    out[1] = data[1] as number;
    return;
  }
  if (isPowerOfTwo(n)) {
    const p = planFor(n);
    if (inverse) p.fft.inverseTransform(out, data);
    else p.fft.transform(out, data);
    return;
  }
  // Inverse via conjugation: idft(x) = conj(dft(conj(x)))/n.
  const c = chirpFor(n);
  const { a, b } = c.m;
  const w = c.w;
  const mSize = c.m.size;
  const sgn = inverse ? -1 : 1;
  a.fill(0);
  for (let j = 0; j < n; j++) {
    const xr = data[2 * j] as number;
    const xi = sgn * (data[2 * j + 1] as number);
    const wr = w[2 * j] as number;
    const wi = w[2 * j + 1] as number;
    a[2 * j] = xr * wr - xi * wi;
    a[2 * j + 1] = xr * wi + xi * wr;
  }
  c.m.fft.transform(b, a);
  const kh = c.kernelHat;
  for (let j = 0; j < mSize; j++) {
    const br = b[2 * j] as number;
    const bi = b[2 * j + 1] as number;
    const kr = kh[2 * j] as number;
    const ki = kh[2 * j + 1] as number;
    b[2 * j] = br * kr - bi * ki;
    b[2 * j + 1] = br * ki + bi * kr;
  }
  c.m.fft.inverseTransform(a, b);
  const scale = inverse ? 1 / n : 1;
  for (let j = 0; j < n; j++) {
    const yr = a[2 * j] as number;
    const yi = a[2 * j + 1] as number;
    const wr = w[2 * j] as number;
    const wi = w[2 * j + 1] as number;
    out[2 * j] = scale * (yr * wr - yi * wi);
    out[2 * j + 1] = sgn * scale * (yr * wi + yi * wr);
  }
}

// Twiddles e^{+2 pi i k/n}, k < n/2, for the half-length real transforms; module state for the same
// reason as the plans (data-independent, bounded, private).
const halfTwiddles = new Map<number, Float64Array>();

function twiddlesFor(n: number): Float64Array {
  let tw = halfTwiddles.get(n);
  if (tw === undefined) {
    if (halfTwiddles.size >= MAX_PLANS) halfTwiddles.clear();
    const h = n >> 1;
    tw = new Float64Array(2 * h);
    for (let k = 0; k < h; k++) {
      tw[2 * k] = Math.cos((2 * Math.PI * k) / n);
      tw[2 * k + 1] = Math.sin((2 * Math.PI * k) / n);
    }
    halfTwiddles.set(n, tw);
  }
  return tw;
}

/**
 * Forward DFT of a real signal x of even length n >= 2 into spec (interleaved, bins 0..n/2), by one complex
 * DFT of length n/2 of z_j = x_2j + i x_2j+1 (x itself, read as interleaved complex): with
 * E_k = (Z_k + conj Z_{n/2-k})/2 and O_k = (Z_k - conj Z_{n/2-k})/(2i), X_k = E_k + e^{-2 pi i k/n} O_k
 * (common practice; e.g. Brigham 1988, The FFT and its Applications). zbuf is scratch of length n. Used for
 * even lengths that are not a power of two, where it halves the Bluestein size.
 */
export function realForwardEven(x: Float64Array, n: number, spec: Float64Array, zbuf: Float64Array): void {
  const h = n >> 1;
  complexDft(x, zbuf, h, false);
  const tw = twiddlesFor(n);
  for (let k = 0; k <= h; k++) {
    const a = k === h ? 0 : k;
    const b = k === 0 ? 0 : h - k;
    const zr = zbuf[2 * a] as number;
    const zi = zbuf[2 * a + 1] as number;
    const cr = zbuf[2 * b] as number;
    const ci = -(zbuf[2 * b + 1] as number);
    const er = 0.5 * (zr + cr);
    const ei = 0.5 * (zi + ci);
    // O = (Z - conj Z')/(2i) = (di, -dr)/2 with d = Z - conj Z'
    const or = 0.5 * (zi - ci);
    const oi = -0.5 * (zr - cr);
    // e^{-2 pi i k/n}: conjugate of the table; k = n/2 gives -1
    const wr = k === h ? -1 : (tw[2 * k] as number);
    const wi = k === h ? 0 : -(tw[2 * k + 1] as number);
    spec[2 * k] = er + (or * wr - oi * wi);
    spec[2 * k + 1] = ei + (or * wi + oi * wr);
  }
}

/**
 * Inverse DFT of a Hermitian spectrum (real signal) of even length n >= 4: spec holds bins 0..n/2
 * interleaved (bins above n/2 are implied by symmetry and not read); out receives the n real samples,
 * x_j = (1/n) sum_m X_m e^{+2 pi i m j/n}. One complex inverse DFT of size n/2: E_k = (X_k + conj X_{n/2-k})/2,
 * O_k = e^{2 pi i k/n} (X_k - conj X_{n/2-k})/2, Z_k = E_k + i O_k, z = IDFT_{n/2}(Z); z read as interleaved
 * complex is x (x_2j = Re z_j, x_2j+1 = Im z_j). zbuf is scratch of length n; it must not alias spec or out.
 */
export function realInverse(spec: Float64Array, out: Float64Array, n: number, zbuf: Float64Array): void {
  const h = n >> 1;
  const tw = twiddlesFor(n);
  for (let k = 0; k < h; k++) {
    const xr = spec[2 * k] as number;
    const xi = spec[2 * k + 1] as number;
    const yr = spec[2 * (h - k)] as number; // X_{n/2-k}
    const yi = -(spec[2 * (h - k) + 1] as number); // conj
    const er = 0.5 * (xr + yr);
    const ei = 0.5 * (xi + yi);
    const dr = 0.5 * (xr - yr);
    const di = 0.5 * (xi - yi);
    const cr = tw[2 * k] as number;
    const ci = tw[2 * k + 1] as number;
    const or = dr * cr - di * ci;
    const oi = dr * ci + di * cr;
    // Z = E + i O
    zbuf[2 * k] = er - oi;
    zbuf[2 * k + 1] = ei + or;
  }
  complexDft(zbuf, out, h, true);
}
