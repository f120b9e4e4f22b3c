// Transect geometry: the depth-averaged current projected on the transect bearing
// (docs/methods/currents.md 5.6; docs/methods/metabolism.md 6.1). Bearings in degrees true, clockwise from
// north, "towards" convention.

const DEG = Math.PI / 180;

/** Velocity along the bearing [m/s]: U = E sin(beta) + N cos(beta). Check: E = -0.1, N = 0, beta 270 gives 0.1. */
export function alongBearingMS(eastMS: number, northMS: number, bearingDeg: number): number {
  const b = bearingDeg * DEG;
  return eastMS * Math.sin(b) + northMS * Math.cos(b);
}

/** Velocity across the bearing [m/s], positive 90 deg counter-clockwise from it: -E cos(beta) + N sin(beta). */
export function acrossBearingMS(eastMS: number, northMS: number, bearingDeg: number): number {
  const b = bearingDeg * DEG;
  return -eastMS * Math.cos(b) + northMS * Math.sin(b);
}

/**
 * Angle between the flow direction and the bearing, in [0, 180] degrees (0 = along, 180 = reversed).
 * Zero flow gives 0. Check: flow towards 300 deg on bearing 270 gives 30.
 */
export function angleOffBearingDeg(eastMS: number, northMS: number, bearingDeg: number): number {
  if (eastMS === 0 && northMS === 0) return 0;
  const u = alongBearingMS(eastMS, northMS, bearingDeg);
  const v = acrossBearingMS(eastMS, northMS, bearingDeg);
  return Math.abs(Math.atan2(v, u)) / DEG;
}

/**
 * Default sigma of the depth-averaged along-transect velocity [m/s] (docs/methods/uncertainty.md 9.2-9.3): 1 % of reading,
 * 0.5 cm/s, and a 2 deg heading error, in quadrature (engineering default built from the typical ADCP accuracy).
 */
export function defaultCurrentSigmaMS(speedMS: number): number {
  const s = Math.abs(speedMS);
  return Math.sqrt((0.01 * s) ** 2 + 0.005 ** 2 + (s * 2 * DEG) ** 2);
}
