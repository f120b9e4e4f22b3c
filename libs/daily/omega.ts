// Calcification against the aragonite saturation state (docs/methods/daily.md 10.2): the linear form
// NEC = a + b Omega_ar fitted by robust weighted least squares, the relation reef studies report most often
// (common practice); Omega_0 = -a/b is the saturation state of zero net calcification, with its sigma by
// first-order propagation through the covariance of (a, b).
import { refuse, type Refusal } from './errors.js';
import { robustLinearFit, type RobustOptions } from './robust.js';

export interface OmegaPoint {
  omegaAr: number;
  /** NEC, mmol CaCO3 m-2 h-1, and its sigma. */
  rate: number;
  sigma: number;
}

export interface OmegaFitOptions extends RobustOptions {
  /** Fewest points (default 12). */
  minWindows?: number;
  /** Smallest range of Omega_ar the points must span (default 0.3). */
  minOmegaSpread?: number;
}

export interface OmegaFit {
  ok: true;
  interceptMmolM2H: number;
  slopeMmolM2HPerOmega: number;
  se: { intercept: number; slope: number; omega0: number };
  /** Omega_ar at which NEC = 0 (null when the slope is not positive). */
  omega0: number | null;
  /** Row-major 2 x 2 covariance of [intercept, slope]. */
  cov: number[];
  scale: number;
  n: number;
}

export type OmegaFitResult = OmegaFit | Refusal;

/** Check (analytic): NEC = -20 + 8 Omega sampled exactly gives slope 8, intercept -20, Omega_0 2.5. */
export function fitCalcificationOmega(
  points: readonly OmegaPoint[],
  options: OmegaFitOptions = {},
): OmegaFitResult {
  const minWindows = options.minWindows ?? 12;
  const minSpread = options.minOmegaSpread ?? 0.3;
  if (points.length < minWindows)
    return refuse('REEFD_DAILY_TOO_FEW_WINDOWS', `${points.length} windows, fewer than ${minWindows}`);
  const om = points.map((p) => p.omegaAr);
  const spread = Math.max(...om) - Math.min(...om);
  if (!(spread >= minSpread))
    return refuse('REEFD_DAILY_OMEGA_SPREAD', `Omega_ar spans ${spread.toFixed(2)}, less than ${minSpread}`);
  const fit = robustLinearFit(
    points.map((p) => [1, p.omegaAr]),
    points.map((p) => p.rate),
    points.map((p) => p.sigma),
    options,
  );
  if (!fit.ok) return refuse('REEFD_DAILY_FIT_FAILED', fit.reason);
  const [a, b] = fit.coef as [number, number];
  const [caa, cab, , cbb] = fit.cov as [number, number, number, number];
  let omega0: number | null = null;
  let seOmega0 = NaN;
  if (b > 0) {
    omega0 = -a / b;
    // d(-a/b)/da = -1/b, d(-a/b)/db = a/b^2
    const ga = -1 / b;
    const gb = a / (b * b);
    seOmega0 = Math.sqrt(Math.max(0, ga * ga * caa + 2 * ga * gb * cab + gb * gb * cbb));
  }
  return {
    ok: true,
    interceptMmolM2H: a,
    slopeMmolM2HPerOmega: b,
    se: { intercept: fit.se[0] as number, slope: fit.se[1] as number, omega0: seOmega0 },
    omega0,
    cov: fit.cov,
    scale: fit.scale,
    n: fit.n,
  };
}
