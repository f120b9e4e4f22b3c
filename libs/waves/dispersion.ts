// Linear (Airy) dispersion omega^2 = g k tanh(k h), solved by Newton's method from the explicit first
// guess of Guo (2002), Coastal Eng. 45, 71-74, and the linear pressure response factor
// Kp = cosh(k z)/cosh(k h) (e.g. Dean & Dalrymple 1991, Water Wave Mechanics for Engineers and Scientists).

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
    throw new RangeError(
      `REEFD_WAVES_DISPERSION_DOMAIN: solveDispersion needs omega >= 0, depth > 0 and g > 0 (finite); got omega=${omegaRadS}, depth=${depthM}, g=${g}`,
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
 * Wavenumbers for a row of increasing radian frequencies (same depth), into out. Each solve starts from the
 * previous root advanced by domega/cg (cg = domega/dk), which is closer than the Guo guess on a fine grid
 * and saves the pow/exp of the guess; the convergence test is the same as solveDispersion's. Falls back
 * to the Guo guess for the first positive frequency or a coarse step.
 */
export function solveDispersionRow(
  omegaRadS: ArrayLike<number>,
  depthM: number,
  g: number,
  out: Float64Array,
  count: number,
): void {
  let prevOmega = 0;
  let prevK = 0;
  let prevCg = 0;
  for (let i = 0; i < count; i++) {
    const w = omegaRadS[i] as number;
    if (w <= 0) {
      out[i] = 0;
      continue;
    }
    let guess: number;
    if (prevK > 0 && w - prevOmega < 0.2 * prevOmega) guess = prevK + (w - prevOmega) / prevCg;
    else guess = guoGuess(w, depthM, g);
    const k = newton(w, depthM, g, guess);
    out[i] = k;
    const kh = k * depthM;
    const t = Math.tanh(kh);
    // group velocity cg = (omega/k) n, n = 0.5 (1 + 2kh/sinh(2kh)) = 0.5 (1 + kh (1 - t^2)/t)
    prevCg = ((w / k) * 0.5 * (1 + (kh * (1 - t * t)) / t)) as number;
    prevOmega = w;
    prevK = k;
  }
}

/**
 * Linear pressure response Kp = cosh(k z)/cosh(k h) for a sensor at height z [m] above the bed in depth h [m]
 * (0 <= z <= h). Kp = 1 at k = 0; Kp -> exp(-k (h - z)) in deep water. Written with exponentials so that
 * it does not overflow for large kh.
 */
export function pressureResponse(kRadM: number, sensorHeightM: number, depthM: number): number {
  const a = kRadM * sensorHeightM;
  const b = kRadM * depthM;
  // cosh(a)/cosh(b) = exp(a - b) (1 + exp(-2a))/(1 + exp(-2b))
  return (Math.exp(a - b) * (1 + Math.exp(-2 * a))) / (1 + Math.exp(-2 * b));
}
