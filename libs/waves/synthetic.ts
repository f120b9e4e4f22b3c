// Synthetic seas for tests, benchmarks and the fictional demo station: the JONSWAP spectrum (Hasselmann et al.
// 1973, Dtsch. Hydrogr. Z. Suppl. A8(12)) scaled to a target Hm0, turned into a random-phase linear sea and
// into bottom pressure with the linear response Kp = cosh(k z)/cosh(k h). Randomness comes only from the
// generator the caller passes (uniform on [0, 1)), so a seed reproduces a burst exactly.
import { G_STANDARD, pressureResponse, solveDispersion } from './dispersion.js';

/**
 * Unscaled JONSWAP shape [m^2/Hz up to a constant]: f^-5 exp(-5/4 (fp/f)^4) gamma^r,
 * r = exp(-(f - fp)^2/(2 sigma^2 fp^2)), sigma = 0.07 (f <= fp) or 0.09 (f > fp), gamma 3.3 by default
 * (Hasselmann et al. 1973). Zero at f <= 0.
 */
export function jonswapShape(fHz: number, fpHz: number, gamma = 3.3): number {
  if (!(fHz > 0)) return 0;
  const sigma = fHz <= fpHz ? 0.07 : 0.09;
  const r = Math.exp(-((fHz - fpHz) ** 2) / (2 * sigma * sigma * fpHz * fpHz));
  return Math.pow(fHz, -5) * Math.exp(-1.25 * Math.pow(fpHz / fHz, 4)) * Math.pow(gamma, r);
}

export interface SeaSpec {
  readonly hm0M: number;
  readonly tpS: number;
  readonly gamma?: number;
  /** components are kept between these frequencies [Hz] (defaults 0.5 fp and 6 fp) */
  readonly fMinHz?: number;
  readonly fMaxHz?: number;
}

export interface PressureBurstSpec {
  readonly n: number;
  readonly fsHz: number;
  /** still-water depth [m] */
  readonly depthM: number;
  readonly sensorHeightM: number;
  readonly rhoKgM3: number;
  readonly patmDbar: number;
  readonly gMS2?: number;
}

/**
 * Bottom pressure [dbar] of a random-phase JONSWAP sea. Components sit on the burst's own frequency grid
 * f_j = j fs/N (periodic in the burst, so the realized variance is exactly sum a_j^2/2), with deterministic
 * amplitudes a_j = sqrt(2 S(f_j) df) scaled so that 4 sqrt(sum a_j^2/2) = hm0 over [fMin, fMax], and phases
 * 2 pi rand(). Returns the pressure and the surface elevation at the sensor position.
 */
export function jonswapPressureBurst(
  sea: SeaSpec,
  b: PressureBurstSpec,
  rand: () => number,
): { pDbar: Float64Array; etaM: Float64Array } {
  const g = b.gMS2 ?? G_STANDARD;
  const fp = 1 / sea.tpS;
  const fMin = sea.fMinHz ?? 0.5 * fp;
  const fMax = Math.min(sea.fMaxHz ?? 6 * fp, b.fsHz / 2);
  const df = b.fsHz / b.n;
  const jLo = Math.max(1, Math.ceil(fMin / df));
  const jHi = Math.floor(fMax / df);
  const count = Math.max(0, jHi - jLo + 1);
  const amp = new Float64Array(count);
  const gain = new Float64Array(count);
  const phase = new Float64Array(count);
  let m0 = 0;
  for (let i = 0; i < count; i++) {
    const f = (jLo + i) * df;
    const s = jonswapShape(f, fp, sea.gamma ?? 3.3);
    amp[i] = s;
    m0 += s * df;
    const k = solveDispersion(2 * Math.PI * f, b.depthM, g);
    gain[i] = pressureResponse(k, b.sensorHeightM, b.depthM);
    phase[i] = 2 * Math.PI * rand();
  }
  const scale = (sea.hm0M * sea.hm0M) / 16 / m0;
  for (let i = 0; i < count; i++) amp[i] = Math.sqrt(2 * (amp[i] as number) * scale * df);
  const etaM = new Float64Array(b.n);
  const pDbar = new Float64Array(b.n);
  const c = (b.rhoKgM3 * g) / 1e4; // dbar per m of head
  for (let t = 0; t < b.n; t++) {
    let eta = 0;
    let head = 0;
    for (let i = 0; i < count; i++) {
      // 2 pi j t/N reduced modulo N keeps the phase argument exact
      const ang = (2 * Math.PI * (((jLo + i) * t) % b.n)) / b.n + (phase[i] as number);
      const e = (amp[i] as number) * Math.cos(ang);
      eta += e;
      head += e * (gain[i] as number);
    }
    etaM[t] = eta;
    pDbar[t] = b.patmDbar + c * (b.depthM - b.sensorHeightM + head);
  }
  return { pDbar, etaM };
}
