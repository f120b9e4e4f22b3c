// Daily budgets of one transect (docs/methods/daily.md 10.4): integrals over the local day's cadence slots
// of the measured rates, gaps filled from the fitted light response, respiration from the night-time mean,
// and their sigmas by first-order propagation through the windows, the fit and the gap filling (10.6).
import { evalTanh, type TanhCurve } from './light-response.js';
import type { Slot } from './slots.js';

/** A fill curve: a fitted tanh curve plus the scatter of single windows about it (rate units). */
export interface FillCurve {
  curve: TanhCurve;
  residualSd: number;
}

/** How one slot's rate was obtained. */
type Estimate =
  | { kind: 'measured'; value: number; sigma: number }
  | { kind: 'curve'; value: number; grad: [number, number, number] }
  | { kind: 'interp'; value: number; sigma: number }
  | { kind: 'none' };

export interface RateSeries {
  est: Estimate[];
  measured: number;
  curve: number;
  interp: number;
  missing: number;
}

/** Per-slot estimates of one rate: measured where a valid window is, else the curve at the slot's PAR, else
 * linear interpolation between known neighbours at most maxInterpSlots apart. */
export function estimateSlots(
  slots: readonly Slot[],
  pick: (s: Slot) => { value: number; sigma: number } | null,
  fill: FillCurve | undefined,
  maxInterpSlots: number,
): RateSeries {
  const est: Estimate[] = slots.map((s) => {
    const m = pick(s);
    if (m) return { kind: 'measured', ...m };
    if (fill && s.par !== null) {
      const e = evalTanh(fill.curve, s.par);
      return { kind: 'curve', value: e.value, grad: e.grad };
    }
    return { kind: 'none' };
  });
  const sigmaOf = (e: Estimate) =>
    e.kind === 'measured' || e.kind === 'interp' ? e.sigma : e.kind === 'curve' ? (fill?.residualSd ?? 0) : 0;
  const known = est.flatMap((e, i) => (e.kind === 'none' ? [] : [i]));
  let j = 0;
  for (let i = 0; i < est.length; i++) {
    if (est[i]?.kind !== 'none') continue;
    while (j < known.length && (known[j] as number) < i) j++;
    const r = known[j];
    const l = j > 0 ? known[j - 1] : undefined;
    if (l === undefined || r === undefined || r - l > maxInterpSlots + 1) continue;
    const a = est[l] as Exclude<Estimate, { kind: 'none' }>;
    const b = est[r] as Exclude<Estimate, { kind: 'none' }>;
    const f = (i - l) / (r - l);
    est[i] = {
      kind: 'interp',
      value: a.value + f * (b.value - a.value),
      sigma: Math.max(sigmaOf(a), sigmaOf(b)),
    };
  }
  const count = (k: Estimate['kind']) => est.filter((e) => e.kind === k).length;
  return {
    est,
    measured: count('measured'),
    curve: count('curve'),
    interp: count('interp'),
    missing: count('none'),
  };
}

export interface Combination {
  value: number;
  variance: number;
}

/**
 * sum_k a_k v_k over the slots, plus extra . theta (a direct use of the curve's parameters), and its
 * variance: measured and interpolated slots m (a_k sigma_k)^2 each (m = window/cadence: overlapping windows
 * share their samples, so their errors add as if m times larger and n/m times fewer), curve slots through
 * the parameter covariance (fully correlated: g^T C g with g = sum a_k grad_k + extra) plus their scatter
 * m (a_k s_res)^2. Undefined when a slot with a non-zero coefficient has no estimate.
 */
export function combine(
  series: RateSeries,
  coef: (k: number) => number,
  fill: FillCurve | undefined,
  overlap: number,
  inflate: (k: number) => number = () => 1,
  extra: [number, number, number] = [0, 0, 0],
): Combination | undefined {
  let value = 0;
  let variance = 0;
  const g: [number, number, number] = [...extra];
  for (let k = 0; k < series.est.length; k++) {
    const a = coef(k);
    if (a === 0) continue;
    const e = series.est[k] as Estimate;
    if (e.kind === 'none') return undefined;
    value += a * e.value;
    if (e.kind === 'curve') {
      for (let i = 0; i < 3; i++) g[i] = g[i]! + a * e.grad[i]!;
      variance += overlap * (a * (fill?.residualSd ?? 0)) ** 2;
    } else variance += overlap * inflate(k) * (a * e.sigma) ** 2;
  }
  if (fill) {
    const c = fill.curve.cov;
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++) variance += g[i]! * (c[i * 3 + j] as number) * g[j]!;
    value += extra[0] * fill.curve.amp + extra[1] * fill.curve.ik + extra[2] * fill.curve.intercept;
  }
  return { value, variance: Math.max(0, variance) };
}
