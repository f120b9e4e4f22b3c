// Uncertainty of the mean water depth from a bottom pressure sensor (docs/methods/uncertainty.md 9.2), by first-order
// propagation of h = z_s + 1e4 (p - p_atm)/(rho g): sigma_h^2 = (1e4/(rho g))^2 (sigma_p^2 + sigma_patm^2)
// + sigma_zs^2. The sampling error of Hm0 is returned by analyzeBurst itself (hm0SigmaM, 4.4).
import { G_STANDARD } from './dispersion.js';

export interface DepthSigmaInput {
  /** pressure sensor accuracy [dbar] */
  readonly sigmaPDbar: number;
  /** barometer accuracy [dbar] (0.01 x hPa) */
  readonly sigmaPatmDbar: number;
  /** uncertainty of the surveyed sensor height [m] */
  readonly sigmaSensorHeightM: number;
  readonly rhoKgM3: number;
  readonly gMS2?: number;
}

/**
 * Standard uncertainty of depth_m [m]. The density error is neglected (< 5e-4 relative for 0.5 kg m-3).
 * Check value: sigma_p = sigma_patm = 0.01 dbar, sigma_zs = 0.01 m, rho = 1025, g = 9.80665 gives
 * 0.017261 m (algebra; "a 1 hPa barometer error is about 1 cm of depth", docs/methods/seawater.md 2.2).
 */
export function depthSigmaM(i: DepthSigmaInput): number {
  const c = 1e4 / (i.rhoKgM3 * (i.gMS2 ?? G_STANDARD));
  return Math.sqrt(c * c * (i.sigmaPDbar ** 2 + i.sigmaPatmDbar ** 2) + i.sigmaSensorHeightM ** 2);
}
