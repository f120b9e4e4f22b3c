// Linear (Airy) dispersion omega^2 = g k tanh(k h), solved by Newton's method from the explicit first
// guess of Guo (2002), Coastal Eng. 45, 71-74, and the linear pressure response factor
// Kp = cosh(k z)/cosh(k h) (e.g. Dean & Dalrymple 1991, Water Wave Mechanics for Engineers and Scientists).
import { WAVES_ERRORS } from './errors.js';

/** m s-2, standard gravity (CGPM 1901); the default when the caller gives no site gravity. */
export const G_STANDARD = 9.80665;

const REL_TOL = 1e-12;
const MAX_ITER = 10;

/**
 * Guo (2002) explicit first guess: with x = omega sqrt(h/g), k h = x^2 [1 - exp(-x^2.5)]^(-0.4).
 * Relative error below 0.8 % over the whole range (Guo 2002). Returns k in rad m-1.
 */
export function guoGuess(omegaRadS: number, depthM: number, g: number = G_STANDARD): number {
  const x2 = (omegaRadS * omegaRadS * depthM) / g;
  const x = Math.sqrt(x2);
  const kh = x2 * Math.pow(1 - Math.exp(-Math.pow(x, 2.5)), -0.4);
  return kh / depthM;
}

/**
 * Wavenumber k [rad m-1] of a linear wave of radian frequency omega [rad s-1] in water of depth h [m].
 * Valid for omega >= 0 and h > 0 (any kh); omega = 0 gives k = 0. Newton on F = omega^2 - g k tanh(kh),
 * F' = -g [tanh(kh) + kh sech^2(kh)], until |dk|/k < 1e-12 (3-4 iterations; at most 10).
 * Check value: T = 10 s, h = 10 m, g = 9.81 gives k = 0.068019 rad/m, L = 92.374 m, d/L = 0.10826 at
 * d/L0 = 0.06405 (scipy.optimize.brentq on the same equation). Throws RangeError
 * for a negative or non-finite argument (a programming error upstream).
 */
export function solveDispersion(omegaRadS: number, depthM: number, g: number = G_STANDARD): number {
  if (!(omegaRadS >= 0) || !(depthM > 0) || !(g > 0) || !Number.isFinite(omegaRadS + depthM + g)) {
    throw WAVES_ERRORS.error(
      'REEFD_WAVES_DISPERSION_DOMAIN',
      `got omega=${omegaRadS}, depth=${depthM}, g=${g}`,
    );
  }
  if (omegaRadS === 0) return 0;
  return newton(omegaRadS, depthM, g, guoGuess(omegaRadS, depthM, g));
}

function newton(omega: number, h: number, g: number, k0: number): number {
  const w2 = omega * omega;
  let k = k0;
  for (let i = 0; i < MAX_ITER; i++) {
    const kh = k * h;
    const t = Math.tanh(kh);
    const f = w2 - g * k * t;
    const fp = -g * (t + kh * (1 - t * t));
    const dk = f / fp;
    k -= dk;
    if (Math.abs(dk) < REL_TOL * k) break;
  }
  return k;
}

/**
 * Wavenumbers k_i [rad m-1] on the uniform grid omega_i = omega0 + i dOmega, i = 0..count-1 (omega0 >= 0,
 * dOmega > 0), into out. This is the hot path of the analysis (one root per spectral bin), so it differs from
 * solveDispersion in two ways, both checked against it to 1e-13 relative in the tests:
 * - from the fourth root on, the guess is the quadratic extrapolation 3 k_{i-1} - 3 k_{i-2} + k_{i-3}, whose
 *   error is O(dOmega^3) (about 1e-8 relative on spectral grids), instead of the Guo guess;
 * - Newton stops once a step is below 1e-7 relative: the error left after that step is about
 *   (k F''/2F') (dk/k)^2 < 1e-13 relative, because k F''/F' is O(1) for this F (quadratic convergence).
 * So most bins cost one Newton step (one tanh).
 */
export function solveDispersionGrid(
  omega0: number,
  dOmega: number,
  count: number,
  depthM: number,
  g: number,
  out: Float64Array,
): void {
  for (let i = 0; i < count; i++) {
    const w = omega0 + i * dOmega;
    if (w <= 0) {
      out[i] = 0;
      continue;
    }
    const guess =
      i >= 3
        ? 3 * (out[i - 1] as number) - 3 * (out[i - 2] as number) + (out[i - 3] as number)
        : guoGuess(w, depthM, g);
    const w2 = w * w;
    let k = guess;
    for (let it = 0; it < MAX_ITER; it++) {
      const kh = k * depthM;
      const t = Math.tanh(kh);
      const dk = (w2 - g * k * t) / (-g * (t + kh * (1 - t * t)));
      k -= dk;
      if (Math.abs(dk) < 1e-7 * k) break;
    }
    out[i] = k;
  }
}

/**
 * Linear pressure response Kp = cosh(k z)/cosh(k h) for a sensor at height z [m] above the bed in depth h [m]
 * (0 <= z <= h). Kp = 1 at k = 0; Kp -> exp(-k (h - z)) in deep water. Written with exponentials so that
 * it does not overflow for large kh.
 */
export function pressureResponse(kRadM: number, sensorHeightM: number, depthM: number): number {
  // cosh(kz)/cosh(kh) = A (1 + Ez)/(1 + A^2 Ez), A = exp(-k (h - z)), Ez = exp(-2 k z), since
  // exp(-2 k h) = A^2 Ez: two exponentials instead of three (this runs once per spectral bin).
  const a = Math.exp(-kRadM * (depthM - sensorHeightM));
  const ez = Math.exp(-2 * kRadM * sensorHeightM);
  return (a * (1 + ez)) / (1 + a * a * ez);
}

/**
 * k and Kp on the spectral grid f_m = m dfHz, m = 0..count-1 (k into kOut, Kp into kpOut), for a sensor
 * at sensorHeightM in depthM. One call per burst serves both the Welch bins and the whole-burst bins.
 */
export function responseOnGrid(
  dfHz: number,
  count: number,
  depthM: number,
  sensorHeightM: number,
  g: number,
  kOut: Float64Array,
  kpOut: Float64Array,
): void {
  solveDispersionGrid(0, 2 * Math.PI * dfHz, count, depthM, g, kOut);
  for (let m = 0; m < count; m++) kpOut[m] = pressureResponse(kOut[m] as number, sensorHeightM, depthM);
}
