// Reef frame, direction and bed stress (reefd docs/methods/currents.md 5.6; docs/contract-v1.md section 3, reef_axis_deg).
//   u = E sin beta + N cos beta    along beta = reef_axis_deg (shoreward cross-reef bearing)
//   v = -E cos beta + N sin beta   along-reef, 90 deg counter-clockwise from u (bearing beta - 90)
//   dir_to = atan2(E, N) mod 360   "towards", clockwise from true north
//   tau_b = rho Cd |U| U           quadratic drag; Cd default 0.03 (reef depth-averaged values span
//                                  about 0.01-0.1: Rosman & Hench 2011, J. Geophys. Res.; Lentz et
//                                  al. 2017, J. Phys. Oceanogr.; from memory, verify)

const DEG = Math.PI / 180;
/** von Karman constant (docs/methods/currents.md 5.6) */
const KAPPA = 0.41;

/** Cross-reef u and along-reef v, m/s. */
export interface ReefVelocity {
  readonly uMS: number;
  readonly vMS: number;
}

/**
 * Rotate east/north (m/s) into the reef frame. Check (worked by hand): beta = 270, a current towards
 * west (E = -1, N = 0) gives u = 1, v = 0; towards south (N = -1) gives u = 0, v = 1.
 */
export function toReefFrame(eastMS: number, northMS: number, reefAxisDeg: number): ReefVelocity {
  const sb = Math.sin(reefAxisDeg * DEG);
  const cb = Math.cos(reefAxisDeg * DEG);
  return { uMS: eastMS * sb + northMS * cb, vMS: -eastMS * cb + northMS * sb };
}

/**
 * Direction towards which the flow goes, deg true clockwise from north, in [0, 360).
 * Check (worked by hand): (E, N) = (1, 0) -> 90; (0, -1) -> 180; (-1, 0) -> 270; (0, 0) -> 0.
 */
export function directionTowardsDeg(eastMS: number, northMS: number): number {
  if (eastMS === 0 && northMS === 0) return 0; // calm (atan2(-0, -0) would say 180)
  const d = Math.atan2(eastMS, northMS) / DEG;
  const w = d < 0 ? d + 360 : d;
  // -1e-15 + 360 rounds to 360 in floating point, and atan2(-0, 1) is -0: keep [0, 360) and +0.
  return w >= 360 || w === 0 ? 0 : w;
}

/**
 * Drag coefficient of the depth-averaged log law, Cd = [kappa/(ln(h/z0) - 1)]^2 (docs/methods/currents.md 5.6),
 * for depth h and roughness length z0 in m, h > e z0. Check (worked by hand): h/z0 = e^5 gives
 * (0.41/4)^2 = 0.01050625.
 */
export function logLawCd(depthM: number, z0M: number): number {
  const k = KAPPA / (Math.log(depthM / z0M) - 1);
  return k * k;
}

/** Bed shear stress magnitude rho Cd |U|^2, Pa, for speed in m/s and rho in kg m-3. */
export function bedStressPa(speedMS: number, rhoKgM3: number, cd: number): number {
  return rhoKgM3 * cd * speedMS * speedMS;
}
