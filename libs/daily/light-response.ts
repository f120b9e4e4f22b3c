// Light-response curves of reef community metabolism (docs/methods/daily.md 10.2):
//   production    NCP = Pmax tanh(I/Ik) - R        (Jassby & Platt 1976, Limnol. Oceanogr. 21, 540)
//   calcification NEC = Gmax tanh(I/Ik,G) + G0     (the same hyperbolic-tangent shape; G0 is the dark rate)
// with I the window-mean PAR (umol photons m-2 s-1) and rates in mmol m-2 h-1.
//
// Fitting: the model is linear in the amplitude and the intercept once Ik is fixed, so Ik is found by
// variable projection (Golub & Pereyra 1973, SIAM J. Numer. Anal. 10, 413): for each trial Ik the two linear
// parameters come from weighted least squares, and the profiled chi-square is minimised over ln Ik (a log grid,
// then golden-section search). Huber IRLS (robust.ts) wraps it; the covariance comes from the full
// three-parameter Jacobian at the optimum.
import { refuse, type DailyErrorCode, type Refusal } from './errors.js';
import { weightedLeastSquares } from './lsq.js';
import { fitCovariance, huberWeights, robustLinearFit, type RobustOptions } from './robust.js';

export interface LightPoint {
  /** Window-mean PAR, umol photons m-2 s-1 (>= 0). */
  parUmolM2S: number;
  /** Rate, mmol m-2 h-1 (NCP in O2, NEC in CaCO3). */
  rate: number;
  /** Its standard uncertainty, mmol m-2 h-1 (> 0). */
  sigma: number;
}

export interface LightFitOptions extends RobustOptions {
  /** Fewest points (default 12: two hours of 10-min windows). */
  minWindows?: number;
  /** PAR below this is dark (default 1 umol m-2 s-1, common practice). */
  darkParUmolM2S?: number;
  /** Fewest dark points (default 3). */
  minDark?: number;
  /** The brightest point must reach this (default 200 umol m-2 s-1)... */
  minMaxParUmolM2S?: number;
  /** ...and this many points must be at or above half of it (default 3). */
  minBright?: number;
  /** Search range of Ik, umol m-2 s-1 (default 10 to 5 x the brightest point). */
  ikMinUmolM2S?: number;
}

/** Parameters of y = amp tanh(I/Ik) + sign * intercept, in the order [amp, ik, intercept]. */
export interface TanhCurve {
  amp: number;
  ik: number;
  intercept: number;
  /** -1 for production (intercept = R > 0 is subtracted), +1 for calcification (intercept = G0 is added). */
  sign: -1 | 1;
  /** Row-major 3 x 3 covariance of [amp, ik, intercept]. */
  cov: number[];
}

export interface LightFit {
  ok: true;
  curve: TanhCurve;
  se: { amp: number; ik: number; intercept: number };
  /** Robust scale of r/sigma, the reduced chi-square, and the residual sd in rate units. */
  scale: number;
  reducedChi2: number;
  residualSd: number;
  n: number;
  nDark: number;
  maxParUmolM2S: number;
  iterations: number;
}

export type LightFitResult = LightFit | Refusal;

/** Value of the curve at PAR I and its gradient with respect to [amp, ik, intercept]. */
export function evalTanh(
  c: TanhCurve,
  parUmolM2S: number,
): { value: number; grad: [number, number, number] } {
  const u = Math.max(0, parUmolM2S) / c.ik;
  const th = Math.tanh(u);
  const sech2 = 1 - th * th;
  return {
    value: c.amp * th + c.sign * c.intercept,
    grad: [th, (-c.amp * u * sech2) / c.ik, c.sign],
  };
}

/** Variance of the curve's value at I from the parameter covariance (first order). */
export function tanhVariance(c: TanhCurve, parUmolM2S: number): number {
  const g = evalTanh(c, parUmolM2S).grad;
  let v = 0;
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) v += g[i]! * (c.cov[i * 3 + j] as number) * g[j]!;
  return Math.max(0, v);
}

interface Profile {
  chi2: number;
  amp: number;
  intercept: number;
}

/** The linear parameters for a fixed Ik by the 2 x 2 weighted normal equations (columns tanh(I/Ik) in [0, 1]
 * and the constant sign: well conditioned, so no QR is needed), and the chi-square left. */
function profile(I: Float64Array, y: Float64Array, w: Float64Array, ik: number, sign: number): Profile {
  const gs = new Float64Array(I.length);
  let sw = 0;
  let sg = 0;
  let sgg = 0;
  let sy = 0;
  let sgy = 0;
  for (let i = 0; i < I.length; i++) {
    const wi = w[i] as number;
    const g = Math.tanh((I[i] as number) / ik);
    gs[i] = g;
    const yi = y[i] as number;
    sw += wi;
    sg += wi * g;
    sgg += wi * g * g;
    sy += wi * yi;
    sgy += wi * g * yi;
  }
  const det = sgg * sw - sg * sg;
  if (!(det > 1e-12 * sgg * sw)) return { chi2: Infinity, amp: NaN, intercept: NaN };
  const amp = (sgy * sw - sg * sy) / det;
  const c = (sgg * sy - sg * sgy) / det; // coefficient of the constant column (= sign * intercept)
  let chi2 = 0;
  for (let i = 0; i < I.length; i++) {
    const r = (y[i] as number) - amp * (gs[i] as number) - c;
    chi2 += (w[i] as number) * r * r;
  }
  return { chi2, amp, intercept: c * sign };
}

const GOLD = (Math.sqrt(5) - 1) / 2;

/** Minimises the profiled chi-square over ln Ik in [lo, hi]: a 48-point grid (or, warm-started from the
 * previous IRLS pass, a 9-point grid within +-0.4 of it), then golden section around the best grid point to
 * 1e-10 in ln Ik. Returns the optimum and whether it sits on the search bound. */
function searchIk(
  I: Float64Array,
  y: Float64Array,
  w: Float64Array,
  lo: number,
  hi: number,
  sign: number,
  warm?: number,
): { ik: number; p: Profile; atBound: boolean } {
  const a0 = warm === undefined ? lo : Math.max(lo, warm - 0.4);
  const b0 = warm === undefined ? hi : Math.min(hi, warm + 0.4);
  const N = warm === undefined ? 48 : 9;
  const xs = Array.from({ length: N }, (_, i) => a0 + ((b0 - a0) * i) / (N - 1));
  const f = xs.map((x) => profile(I, y, w, Math.exp(x), sign).chi2);
  let best = 0;
  for (let i = 1; i < N; i++) if ((f[i] as number) < (f[best] as number)) best = i;
  if (warm !== undefined && (best === 0 || best === N - 1) && (a0 > lo || b0 < hi)) {
    return searchIk(I, y, w, lo, hi, sign); // moved far: search the whole range again
  }
  let a = xs[Math.max(0, best - 1)] as number;
  let b = xs[Math.min(N - 1, best + 1)] as number;
  let c = b - GOLD * (b - a);
  let d = a + GOLD * (b - a);
  let fc = profile(I, y, w, Math.exp(c), sign).chi2;
  let fd = profile(I, y, w, Math.exp(d), sign).chi2;
  for (let it = 0; it < 200 && b - a > 1e-10; it++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - GOLD * (b - a);
      fc = profile(I, y, w, Math.exp(c), sign).chi2;
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + GOLD * (b - a);
      fd = profile(I, y, w, Math.exp(d), sign).chi2;
    }
  }
  const x = 0.5 * (a + b);
  const tol = 1e-3 * (hi - lo);
  return { ik: Math.exp(x), p: profile(I, y, w, Math.exp(x), sign), atBound: x - lo < tol || hi - x < tol };
}

function checkSpread(points: readonly LightPoint[], o: Required<LightFitOptions>): Refusal | undefined {
  const n = points.length;
  if (n < o.minWindows)
    return refuse('REEFD_DAILY_TOO_FEW_WINDOWS', `${n} windows, fewer than ${o.minWindows}`);
  const nDark = points.filter((p) => p.parUmolM2S < o.darkParUmolM2S).length;
  if (nDark < o.minDark)
    return refuse('REEFD_DAILY_NO_DARK_WINDOWS', `${nDark} dark windows, fewer than ${o.minDark}`);
  const maxI = Math.max(...points.map((p) => p.parUmolM2S));
  const nBright = points.filter((p) => p.parUmolM2S >= 0.5 * maxI).length;
  if (maxI < o.minMaxParUmolM2S || nBright < o.minBright)
    return refuse(
      'REEFD_DAILY_LIGHT_SPREAD',
      `brightest window ${maxI.toFixed(0)} umol m-2 s-1 (needs ${o.minMaxParUmolM2S}), ${nBright} windows ` +
        `at half of it or more (needs ${o.minBright})`,
    );
  return undefined;
}

const DEFAULTS: Required<LightFitOptions> = {
  loss: 'huber',
  huberK: 1.345,
  tukeyC: 4.685,
  maxIter: 50,
  overlapFactor: 1,
  minWindows: 12,
  darkParUmolM2S: 1,
  minDark: 3,
  minMaxParUmolM2S: 200,
  minBright: 3,
  ikMinUmolM2S: 10,
};

/** Fits y = amp tanh(I/Ik) + sign * intercept by robust weighted least squares (see the file header). */
export function fitTanhCurve(
  points: readonly LightPoint[],
  sign: -1 | 1,
  options: LightFitOptions = {},
): LightFitResult {
  const o = { ...DEFAULTS, ...options };
  const bad = points.find(
    (p) => !(p.sigma > 0) || !Number.isFinite(p.rate) || !Number.isFinite(p.parUmolM2S),
  );
  if (bad) return refuse('REEFD_DAILY_FIT_FAILED', `a window has rate ${bad.rate}, sigma ${bad.sigma}`);
  const spread = checkSpread(points, o);
  if (spread) return spread;
  const n = points.length;
  const I = Float64Array.from(points, (p) => Math.max(0, p.parUmolM2S));
  const y = Float64Array.from(points, (p) => p.rate);
  const sigma = Float64Array.from(points, (p) => p.sigma);
  const maxI = Math.max(...I);
  const lo = Math.log(o.ikMinUmolM2S);
  const hi = Math.log(5 * maxI);
  let rw: Float64Array = new Float64Array(n).fill(1);
  let scale = 1;
  const w = new Float64Array(n);
  let last: { ik: number; p: Profile; atBound: boolean } | undefined;
  let iterations = 0;
  // Stages as in robustLinearFit: Huber to convergence, then (for 'tukey') the biweight from there.
  let stage: 'huber' | 'tukey' = 'huber';
  for (let it = 1; it <= 2 * o.maxIter; it++) {
    iterations = it;
    for (let i = 0; i < n; i++) w[i] = (rw[i] as number) / (sigma[i] as number) ** 2;
    const s = searchIk(I, y, w, lo, hi, sign, last && Math.log(last.ik));
    if (!Number.isFinite(s.p.chi2)) return refuse('REEFD_DAILY_FIT_FAILED', 'singular design');
    const done =
      last !== undefined &&
      Math.abs(s.ik / last.ik - 1) < 1e-8 &&
      Math.abs(s.p.amp - last.p.amp) <= 1e-8 * (Math.abs(s.p.amp) + 1e-9) &&
      Math.abs(s.p.intercept - last.p.intercept) <= 1e-8 * (Math.abs(s.p.intercept) + 1e-9);
    last = s;
    if (o.loss === 'linear') break;
    if (done || it === o.maxIter) {
      if (stage === 'tukey' || o.loss === 'huber') break;
      stage = 'tukey';
    }
    const r = Float64Array.from(
      I,
      (x, i) => (y[i] as number) - s.p.amp * Math.tanh(x / s.ik) - sign * s.p.intercept,
    );
    const hw = huberWeights(r, sigma, stage === 'tukey' ? o.tukeyC : o.huberK, stage);
    rw = hw.weights;
    scale = hw.scale;
  }
  const fit = last as { ik: number; p: Profile; atBound: boolean };
  return finish(fit, I, y, sigma, sign, o, { scale, iterations, n, maxI });
}

function finish(
  fit: { ik: number; p: Profile; atBound: boolean },
  I: Float64Array,
  y: Float64Array,
  sigma: Float64Array,
  sign: -1 | 1,
  o: Required<LightFitOptions>,
  info: { scale: number; iterations: number; n: number; maxI: number },
): LightFitResult {
  const { ik } = fit;
  const { amp, intercept } = fit.p;
  if (!(amp > 0)) return refuse('REEFD_DAILY_NO_LIGHT_RESPONSE', `fitted amplitude ${amp.toFixed(3)}`);
  if (fit.atBound || ik >= info.maxI) {
    const code: DailyErrorCode = 'REEFD_DAILY_IK_UNRESOLVED';
    return refuse(
      code,
      `Ik ${ik.toFixed(0)} umol m-2 s-1 against a brightest window of ${info.maxI.toFixed(0)}`,
    );
  }
  const curve: TanhCurve = { amp, ik, intercept, sign, cov: [] };
  const jac = Array.from(I, (x) => evalTanh(curve, x).grad);
  const w0 = Float64Array.from(sigma, (s) => 1 / (s * s));
  const lin = weightedLeastSquares(jac, y, w0);
  if (!lin.ok) return refuse('REEFD_DAILY_FIT_FAILED', `singular Jacobian (${lin.reason})`);
  const r = Float64Array.from(I, (x, i) => (y[i] as number) - evalTanh(curve, x).value);
  const z = Float64Array.from(r, (v, i) => v / (sigma[i] as number));
  if (o.loss === 'linear') info.scale = huberWeights(r, sigma, o.huberK).scale;
  const s = fitCovariance(lin.covUnscaled, z, 3, {
    loss: o.loss,
    huberK: o.huberK,
    tukeyC: o.tukeyC,
    scale: info.scale,
    overlapFactor: o.overlapFactor,
  });
  curve.cov = s.cov;
  const ss = r.reduce((a, v) => a + v * v, 0);
  return {
    ok: true,
    curve,
    se: { amp: s.se[0] as number, ik: s.se[1] as number, intercept: s.se[2] as number },
    scale: info.scale,
    reducedChi2: s.reducedChi2,
    residualSd: Math.sqrt(ss / Math.max(1, info.n - 3)),
    n: info.n,
    nDark: I.filter((x) => x < o.darkParUmolM2S).length,
    maxParUmolM2S: info.maxI,
    iterations: info.iterations,
  };
}

/** NCP = Pmax tanh(I/Ik) - R: amp = Pmax (mmol O2 m-2 h-1), intercept = R (positive). */
export function fitProductionLight(
  points: readonly LightPoint[],
  options: LightFitOptions = {},
): LightFitResult {
  return fitTanhCurve(points, -1, options);
}

/** NEC = Gmax tanh(I/Ik) + G0: amp = Gmax, intercept = G0, the dark calcification (negative: dissolution). */
export function fitCalcificationLight(
  points: readonly LightPoint[],
  options: LightFitOptions = {},
): LightFitResult {
  return fitTanhCurve(points, 1, options);
}

/**
 * The day's curve with Ik held at a value known from a longer record (the sliding week): amplitude and
 * intercept by robust weighted least squares, which is linear once Ik is fixed. The saturation light is a
 * slow property of the community (photoacclimation takes days to weeks) while Pmax follows the day's cloud
 * and water, and one day's windows pin Ik down poorly; this is the curve the daily budget fills gaps with
 * (docs/methods/daily.md 10.4). The covariance keeps the week's variance of Ik (taken as independent of the
 * day's two parameters).
 */
export function fitTanhFixedIk(
  points: readonly LightPoint[],
  sign: -1 | 1,
  ikUmolM2S: number,
  ikVariance: number,
  options: RobustOptions = {},
): LightFitResult {
  if (points.length < 6)
    return refuse('REEFD_DAILY_TOO_FEW_WINDOWS', `${points.length} windows, fewer than 6`);
  const rows = points.map((p) => [Math.tanh(Math.max(0, p.parUmolM2S) / ikUmolM2S), sign]);
  const fit = robustLinearFit(
    rows,
    points.map((p) => p.rate),
    points.map((p) => p.sigma),
    options,
  );
  if (!fit.ok) return refuse('REEFD_DAILY_FIT_FAILED', fit.reason);
  const [amp, intercept] = fit.coef as [number, number];
  if (!(amp > 0)) return refuse('REEFD_DAILY_NO_LIGHT_RESPONSE', `fitted amplitude ${amp.toFixed(3)}`);
  const [caa, cac, , ccc] = fit.cov as [number, number, number, number];
  const curve: TanhCurve = {
    amp,
    ik: ikUmolM2S,
    intercept,
    sign,
    cov: [caa, 0, cac, 0, Math.max(0, ikVariance), 0, cac, 0, ccc],
  };
  let ss = 0;
  for (const p of points) ss += (p.rate - evalTanh(curve, p.parUmolM2S).value) ** 2;
  return {
    ok: true,
    curve,
    se: { amp: fit.se[0] as number, ik: Math.sqrt(Math.max(0, ikVariance)), intercept: fit.se[1] as number },
    scale: fit.scale,
    reducedChi2: fit.reducedChi2,
    residualSd: Math.sqrt(ss / Math.max(1, points.length - 2)),
    n: points.length,
    nDark: points.filter((p) => p.parUmolM2S < 1).length,
    maxParUmolM2S: Math.max(...points.map((p) => p.parUmolM2S)),
    iterations: fit.iterations,
  };
}
