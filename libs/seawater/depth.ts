// Gravity and pressure-to-depth (docs/methods/conventions.md 1.3; docs/methods/seawater.md 2.2).
// Fofonoff N.P. & Millard R.C. (1983), UNESCO Tech. Pap. Mar. Sci. 44: gravity formula and depth from pressure.

/** Standard gravity, m s-2 (CGPM 1901), used when the site latitude is not configured. */
export const STANDARD_GRAVITY = 9.80665;

/**
 * Gravity at latitude phi (degrees), m s-2: 9.780318 (1 + 5.2788e-3 sin^2 phi + 2.36e-5 sin^4 phi)
 * (Fofonoff & Millard 1983). Without a latitude, standard gravity 9.80665 (docs/methods/conventions.md 1.3).
 * Check value: 9.780318 at the equator, 9.832177 at the pole (evaluated from the formula).
 */
export function gravity(latDeg?: number): number {
  if (latDeg === undefined) return STANDARD_GRAVITY;
  const s = Math.sin((latDeg * Math.PI) / 180);
  const s2 = s * s;
  return 9.780318 * (1 + 5.2788e-3 * s2 + 2.36e-5 * s2 * s2);
}

/**
 * Water depth above the bed h, m, from an absolute pressure reading (docs/methods/seawater.md 2.2):
 * h = z_s + 1e4 (p - p_atm) / (rho g), p in dbar, p_atm = 0.01 baro_hpa, z_s the sensor height above the
 * bed, rho the station's density (kg m-3). Check value: 10 dbar of sea pressure in water of 1023.343
 * kg m-3 at standard gravity is 9.9646 m (evaluated); 1 hPa of barometer error is 0.996 cm.
 */
export function depthFromPressure(
  pressureDbar: number,
  baroHpa: number,
  densityKgM3: number,
  heightM = 0,
  latDeg?: number,
): number {
  return heightM + (1e4 * (pressureDbar - 0.01 * baroHpa)) / (densityKgM3 * gravity(latDeg));
}

/**
 * UNESCO depth (m) from sea pressure (dbar), Fofonoff & Millard (1983): assumes S 35, 0 degC; kept for
 * comparison only (about 0.5 % off in warm reef water, docs/methods/seawater.md 2.2).
 * Check value: 9712.653 m at 10000 dbar, latitude 30 deg (Fofonoff & Millard 1983).
 */
export function unescoDepth(seaPressureDbar: number, latDeg: number): number {
  const p = seaPressureDbar;
  const s = Math.sin((latDeg * Math.PI) / 180);
  const s2 = s * s;
  const g = 9.780318 * (1 + (5.2788e-3 + 2.36e-5 * s2) * s2) + 1.092e-6 * p;
  return ((((-1.82e-15 * p + 2.279e-10) * p - 2.2512e-5) * p + 9.72659) * p) / g;
}
