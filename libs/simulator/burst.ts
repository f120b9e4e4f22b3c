// Bottom-pressure bursts by linear wave theory: a random-phase realisation of a surface spectrum
// (JONSWAP shape for the sea-swell band, Hasselmann et al. 1973, Dtsch. Hydrogr. Z. A8(12); a flat
// infragravity band 0.005-0.04 Hz), each component attenuated to the sensor by Kp = cosh(k z)/cosh(k h)
// (science 4.3) and summed by one inverse FFT. Because every component sits on an FFT bin of the burst,
// the realised surface variance equals the target m0 exactly, so the truth Hm0 is the burst's own.
import FFT from 'fft.js';
import { G, wavenumber } from './hydro.js';
import type { Rng } from './prng.js';

export interface BurstSpec {
  fsHz: number;
  samples: number;
  /** Mean water depth at the burst start (m) and its rate of change (m/s, the tide). */
  depthM: number;
  depthRateMS: number;
  /** Sensor height above the bed, m. */
  sensorHeightM: number;
  hm0SsM: number;
  tpS: number;
  hm0IgM: number;
  rhoKgM3: number;
  baroHpa: number;
  /** Sensor noise, dbar (1 sd). */
  noiseDbar: number;
}

/** JONSWAP shape (unnormalised) at f for peak fp, gamma 3.3 (Hasselmann et al. 1973). */
export function jonswapShape(fHz: number, fpHz: number, gamma = 3.3): number {
  if (fHz <= 0) return 0;
  const sigma = fHz <= fpHz ? 0.07 : 0.09;
  const r = Math.exp(-((fHz - fpHz) ** 2) / (2 * sigma * sigma * fpHz * fpHz));
  return fHz ** -5 * Math.exp(-1.25 * (fpHz / fHz) ** 4) * gamma ** r;
}

const plans = new Map<number, FFT>();
function plan(n: number): FFT {
  let p = plans.get(n);
  if (p === undefined) {
    p = new FFT(n);
    plans.set(n, p);
  }
  return p;
}

/** Absolute pressures (dbar) of one burst; `samples` must be a power of two. */
export function synthesizeBurst(spec: BurstSpec, rng: Rng): Float64Array {
  const n = spec.samples;
  const df = spec.fsHz / n;
  const fp = 1 / spec.tpS;
  const half = n / 2;
  const ss = new Float64Array(half);
  const ig = new Float64Array(half);
  let sumSs = 0;
  let sumIg = 0;
  for (let m = 1; m < half; m++) {
    const f = m * df;
    if (f >= 0.005 && f < 0.04) {
      ig[m] = 1;
      sumIg += df;
    } else if (f >= 0.04) {
      const s = jonswapShape(f, fp);
      ss[m] = s;
      sumSs += s * df;
    }
  }
  const m0Ss = (spec.hm0SsM / 4) ** 2;
  const m0Ig = (spec.hm0IgM / 4) ** 2;
  const fft = plan(n);
  const spectrum = fft.createComplexArray() as number[];
  const dbarPerM = (spec.rhoKgM3 * G) / 1e4;
  const zs = spec.sensorHeightM;
  const h = spec.depthM;
  for (let m = 1; m < half; m++) {
    const sEta =
      (sumSs > 0 ? ((ss[m] as number) * m0Ss) / sumSs : 0) +
      (sumIg > 0 ? ((ig[m] as number) * m0Ig) / sumIg : 0);
    const phase = 2 * Math.PI * rng.next();
    if (sEta <= 0) continue;
    const k = wavenumber(m * df, h);
    const kp = Math.cosh(k * zs) / Math.cosh(k * h);
    const amp = Math.sqrt(2 * sEta * df) * kp * dbarPerM; // dbar
    // x[j] = sum_m amp cos(2 pi m j/n + phase): bins m and n - m carry (n/2) amp e^(+-i phase).
    spectrum[2 * m] = half * amp * Math.cos(phase);
    spectrum[2 * m + 1] = half * amp * Math.sin(phase);
    spectrum[2 * (n - m)] = half * amp * Math.cos(phase);
    spectrum[2 * (n - m) + 1] = -half * amp * Math.sin(phase);
  }
  const out = fft.createComplexArray() as number[];
  fft.inverseTransform(out, spectrum);
  const p = new Float64Array(n);
  const pAtm = spec.baroHpa / 100; // dbar
  for (let j = 0; j < n; j++) {
    const head = h - zs + spec.depthRateMS * (j / spec.fsHz);
    p[j] = pAtm + head * dbarPerM + (out[2 * j] as number) + spec.noiseDbar * rng.normal();
  }
  return p;
}
