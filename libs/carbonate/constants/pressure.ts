// Millero F.J. (1995), Geochim. Cosmochim. Acta 59, 661-677, with the KW row of Millero (1983, Chemical
// Oceanography 8): pressure corrections ln(K_P/K_0) = -(dV/RT) P + 0.5 (dK/RT) P^2 (docs/methods/carbonate.md 3.2).
// KB uses a1 = +0.1622 (the printed sign is a typo, as CO2SYS notes); Ksp rows after Ingle (1975)/Millero (1979).

/** Gas constant in cm3 bar mol-1 K-1 (CODATA 2018, 8.314462618 J mol-1 K-1). */
export const R_CM3_BAR = 83.14462618;

/** Rows of the pressure table: a0, a1, a2 (cm3 mol-1), b0, b1 (1e-3 cm3 mol-1 bar-1). */
export const PRESSURE_COEFFS = {
  k1: [-25.5, 0.1271, 0, -3.08, 0.0877],
  k2: [-15.82, -0.0219, 0, 1.13, -0.1475],
  kb: [-29.48, 0.1622, -2.608e-3, -2.84, 0],
  kw: [-20.02, 0.1119, -1.409e-3, -5.13, 0.0794],
  ks: [-18.03, 0.0466, 3.16e-4, -4.53, 0.09],
  kf: [-9.78, -0.009, -9.42e-4, -3.91, 0.054],
  kp1: [-14.51, 0.1211, -3.21e-4, -2.67, 0.0427],
  kp2: [-23.12, 0.1758, -2.647e-3, -5.15, 0.09],
  kp3: [-26.57, 0.202, -3.042e-3, -4.08, 0.0714],
  ksi: [-29.48, 0.1622, -2.608e-3, -2.84, 0],
  kspCa: [-48.76, 0.5304, 0, -11.76, 0.3692],
  kspAr: [-45.96, 0.5304, 0, -11.76, 0.3692],
} as const satisfies Record<string, readonly [number, number, number, number, number]>;

export type PressureRow = readonly [number, number, number, number, number];

/**
 * Multiplicative pressure factor K_P/K_0 for one row. `pressureBar` is sea pressure in bar (dbar / 10).
 * Check value: at 0 bar the factor is exactly 1; K1 at 1000 bar, 25 degC grows by about 3.0x (evaluated).
 */
export function pressureFactor(row: PressureRow, tempC: number, tempK: number, pressureBar: number): number {
  if (pressureBar === 0) return 1;
  const dV = row[0] + row[1] * tempC + row[2] * tempC * tempC;
  const dK = (row[3] + row[4] * tempC) * 1e-3;
  return Math.exp(((-dV + 0.5 * dK * pressureBar) * pressureBar) / (R_CM3_BAR * tempK));
}
