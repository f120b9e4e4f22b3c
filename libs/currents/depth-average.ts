// Depth average of an ADCP profile (reefd docs/methods/currents.md 5.5): near-bed power law after Chen (1991),
// J. Hydraul. Eng. (m = 6; as used for ADCP discharge by Simpson & Oltmann 1993, USGS Water-Supply
// Paper 2395), trapezoids between valid bins, and a constant or power-law top extrapolation.
//
//   Q = u_1 z_1 m/(m + 1)                         bed to z_1, u = u_1 (z/z_1)^(1/m)
//     + sum 0.5 (u_k + u_k+1)(z_k+1 - z_k)        interior (gaps bridged linearly)
//     + top:  constant  u_M (h - z_M)
//             power     a (h^(p+1) - z_M^(p+1))/(p+1), p = 1/m,  a = sum u_k z_k^p / sum z_k^2p
//   U_bar = Q/h
// The top power law keeps the bed exponent and fits only its coefficient, by least squares over all
// valid bins: linear in u, so it works on east and north separately and on flows that reverse.
// Check: u = u* (z/h)^(1/6) averages to 6/7 u* (analytic); the test holds it within 0.3 %.
import { CURRENT_ERRORS } from './errors.js';

/** Both top variants of the depth average of one component, m/s. */
export interface DepthMean {
  /** constant top extrapolation */
  readonly constantMS: number;
  /** power-law top extrapolation */
  readonly powerMS: number;
}

/**
 * Depth average core for two components at once (they share z and the power-law weights z^p):
 * z (m, ascending, 0 < z < h), u and v (m/s) for `count` >= 1 bins, m > 0. Writes to out:
 * [u constant top, u power top, v constant top, v power top], m/s.
 */
export function depthAverage2Into(
  z: ArrayLike<number>,
  u: ArrayLike<number>,
  v: ArrayLike<number>,
  count: number,
  depthM: number,
  m: number,
  out: Float64Array,
): void {
  const p = 1 / m;
  const z1 = z[0] as number;
  const bed = (z1 * m) / (m + 1);
  let qu = (u[0] as number) * bed;
  let qv = (v[0] as number) * bed;
  let numU = 0;
  let numV = 0;
  let den = 0;
  let zPrev = z1;
  let uPrev = u[0] as number;
  let vPrev = v[0] as number;
  for (let k = 0; k < count; k++) {
    const zk = z[k] as number;
    const uk = u[k] as number;
    const vk = v[k] as number;
    if (k > 0) {
      const dz = 0.5 * (zk - zPrev);
      qu += (uPrev + uk) * dz;
      qv += (vPrev + vk) * dz;
      zPrev = zk;
      uPrev = uk;
      vPrev = vk;
    }
    // z^(1/6) by roots for the default m = 6: several times faster than pow, equal to < 1 ulp
    const zp = m === 6 ? Math.cbrt(Math.sqrt(zk)) : Math.pow(zk, p);
    numU += uk * zp;
    numV += vk * zp;
    den += zp * zp;
  }
  const top = depthM - zPrev;
  // integral of z^p from z_M to h, over the fitted coefficient's denominator
  const shape = (Math.pow(depthM, p + 1) - Math.pow(zPrev, p + 1)) / (p + 1) / den;
  out[0] = (qu + uPrev * top) / depthM;
  out[1] = (qu + numU * shape) / depthM;
  out[2] = (qv + vPrev * top) / depthM;
  out[3] = (qv + numV * shape) / depthM;
}

/**
 * Depth-averaged velocity of one component, m/s, from bin heights zM (ascending, above the bed, m)
 * and velocities uMS (m/s), over water depth depthM (m). m is the near-bed power-law exponent.
 */
export function depthAverage(
  zM: ArrayLike<number>,
  uMS: ArrayLike<number>,
  depthM: number,
  m = 6,
): DepthMean {
  if (zM.length < 1 || zM.length !== uMS.length) {
    throw CURRENT_ERRORS.error('REEFD_CURRENTS_SHAPE', 'depthAverage needs equal-length, non-empty z and u');
  }
  const out = new Float64Array(4);
  depthAverage2Into(zM, uMS, uMS, zM.length, depthM, m, out);
  return { constantMS: out[0] as number, powerMS: out[1] as number };
}
