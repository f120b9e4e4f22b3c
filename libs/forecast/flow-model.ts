// The fitted flow model of a transect (docs/methods/forecast.md 11.3): cross-reef velocity at the transect's
// current station as a power law of the offshore wave height and the local water depth,
//   ln u = a + b ln Hm0_offshore + c ln h,
// fitted by robust least squares on the ADCP's own valid ensembles (u > 0 along the transect). Wave-driven
// reef-flat flow rises with the offshore height (setup) and falls as the tide deepens the flat (the reef-lagoon
// circulation of Symonds, Black & Young 1995, J. Geophys. Res. 100, 2639; Lowe et al. 2009, J. Phys.
// Oceanogr. 39, 873 find u rising about linearly with H for a fixed depth). The residual spread in ln u is the
// model's sigma. A regressor that barely varies over the record (a calm week) is left out rather than guessed.
import { robustLinearFit } from '../daily/index.js';

export interface FlowSample {
  tMs: number;
  /** Depth-averaged velocity along the transect (m/s, downstream positive). */
  uMS: number;
  /** Offshore significant wave height (outermost pressure station), m. */
  hm0OffshoreM: number;
  /** Water depth at the current station, m. */
  depthM: number;
}

export interface FlowModel {
  ok: true;
  /** ln u = a + b ln H + c ln h (u m/s, H and h m). */
  a: number;
  b: number;
  c: number;
  /** Row-major 3 x 3 covariance of [a, b, c] (zeros for a term left out). */
  cov: number[];
  /** Robust sd of the residuals of ln u (one ensemble's scatter about the model). */
  residualSdLn: number;
  n: number;
  /** Which terms were fitted. */
  terms: { wave: boolean; depth: boolean };
  /** Range of the inputs fitted (predictions outside extrapolate). */
  hm0RangeM: [number, number];
  depthRangeM: [number, number];
  fittedAtMs: number;
}

export type FlowModelResult = FlowModel | { ok: false; reason: string };

export interface FlowFitOptions {
  /** Fewest samples (default 24: six hours of 15-min means). */
  minSamples?: number;
  /** Ensembles slower than this are left out (default 0.005 m/s: the log needs u > 0). */
  minSpeedMS?: number;
  /** A regressor spanning less than this in ln is left out (default 0.1, about 10 %). */
  minLnSpread?: number;
}

const spread = (xs: number[]) => Math.max(...xs) - Math.min(...xs);

export function fitFlowModel(
  samples: readonly FlowSample[],
  fittedAtMs: number,
  o: FlowFitOptions = {},
): FlowModelResult {
  const minU = o.minSpeedMS ?? 0.005;
  const use = samples.filter(
    (s) =>
      s.uMS > minU &&
      s.hm0OffshoreM > 0 &&
      s.depthM > 0 &&
      [s.uMS, s.hm0OffshoreM, s.depthM].every(Number.isFinite),
  );
  if (use.length < (o.minSamples ?? 24)) return { ok: false, reason: `${use.length} valid samples` };
  const lnH = use.map((s) => Math.log(s.hm0OffshoreM));
  const lnD = use.map((s) => Math.log(s.depthM));
  const wave = spread(lnH) >= (o.minLnSpread ?? 0.1);
  const depth = spread(lnD) >= (o.minLnSpread ?? 0.1);
  const rows = use.map((_, i) => [
    1,
    ...(wave ? [lnH[i] as number] : []),
    ...(depth ? [lnD[i] as number] : []),
  ]);
  const y = use.map((s) => Math.log(s.uMS));
  const fit = robustLinearFit(
    rows,
    y,
    y.map(() => 1),
  );
  if (!fit.ok) return { ok: false, reason: fit.reason };
  const p = rows[0]!.length;
  const at = [0, ...(wave ? [1] : []), ...(depth ? [2] : [])];
  const coef = [0, 0, 0];
  const cov = new Array<number>(9).fill(0);
  at.forEach((k, i) => {
    coef[k] = fit.coef[i] as number;
    at.forEach((l, j) => (cov[k * 3 + l] = fit.cov[i * p + j] as number));
  });
  // Sigmas are 1, so the robust scale of the residuals is their sd in ln u.
  return {
    ok: true,
    a: coef[0] as number,
    b: coef[1] as number,
    c: coef[2] as number,
    cov,
    residualSdLn: fit.scale,
    n: use.length,
    terms: { wave, depth },
    hm0RangeM: [Math.min(...use.map((s) => s.hm0OffshoreM)), Math.max(...use.map((s) => s.hm0OffshoreM))],
    depthRangeM: [Math.min(...use.map((s) => s.depthM)), Math.max(...use.map((s) => s.depthM))],
    fittedAtMs,
  };
}

/** The modelled velocity (m/s) and the sd of its ln: the parameters' part (g^T C g) and one ensemble's
 * scatter about the model (residualSdLn) are returned apart, because a night's error is mostly the first
 * plus a slowly varying share of the second. */
export function predictFlow(
  m: FlowModel,
  hm0OffshoreM: number,
  depthM: number,
): { uMS: number; paramSdLn: number; residualSdLn: number } {
  const g = [1, Math.log(hm0OffshoreM), Math.log(depthM)];
  const lnU = m.a + m.b * (g[1] as number) + m.c * (g[2] as number);
  let v = 0;
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) v += (g[i] as number) * (m.cov[i * 3 + j] as number) * (g[j] as number);
  return { uMS: Math.exp(lnU), paramSdLn: Math.sqrt(Math.max(0, v)), residualSdLn: m.residualSdLn };
}
