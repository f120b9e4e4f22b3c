// Gravity and hydrostatic depth (science.md 2.2). Fofonoff N.P. & Millard R.C. (1983), UNESCO Tech. Pap.
// Mar. Sci. 44: the latitude formula for g and the UNESCO depth formula.

/** Standard gravity, m s-2 (CGPM 1901): used when the site latitude is not configured. */
export const G_STANDARD = 9.80665;

/**
 * Gravity at latitude phi [m s-2]: g = 9.780318 (1 + 5.2788e-3 sin^2 phi + 2.36e-5 sin^4 phi).
 * Without a latitude, standard gravity. Check: 9.780318 at the equator, 9.832177 at the pole (evaluated).
 */
export function gravity(latDeg?: number): number {
  if (latDeg === undefined) return G_STANDARD;
  const s2 = Math.sin((latDeg * Math.PI) / 180) ** 2;
  return 9.780318 * (1 + 5.2788e-3 * s2 + 2.36e-5 * s2 * s2);
}

/**
 * Total water depth from an absolute bottom pressure (science.md 2.2):
 * h = z_s + 1e4 (p - p_atm)/(rho g) [m], p and p_atm in dbar, z_s the sensor height above the bed.
 * A 1 hPa barometer error is ~1 cm of depth.
 */
export function depthFromPressure(
  pDbar: number,
  patmDbar: number,
  rhoKgM3: number,
  gMS2: number,
  sensorHeightM = 0,
): number {
  return sensorHeightM + (1e4 * (pDbar - patmDbar)) / (rhoKgM3 * gMS2);
}

/**
 * UNESCO depth (Fofonoff & Millard 1983) for S 35, 0 degC [m] from sea pressure p [dbar] at latitude phi.
 * Not used on the reef flat (about 0.5 % off in warm water); kept for the deep fore-reef comparison.
 * Check value: 9712.653 m at 10000 dbar, 30 deg (Fofonoff & Millard 1983).
 */
export function depthUnesco(seaPressureDbar: number, latDeg: number): number {
  const p = seaPressureDbar;
  const x = Math.sin((latDeg * Math.PI) / 180) ** 2;
  const gr = 9.780318 * (1 + (5.2788e-3 + 2.36e-5 * x) * x) + 1.092e-6 * p;
  return ((((-1.82e-15 * p + 2.279e-10) * p - 2.2512e-5) * p + 9.72659) * p) / gr;
}
