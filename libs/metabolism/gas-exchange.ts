// Air-sea gas transfer:
// - Wanninkhof (2014), Limnol. Oceanogr. Methods 12, 351-362: k660 = 0.251 U10^2 [cm/h] and the Schmidt-number
//   polynomials for seawater (S 35, -2 to 40 degC) (coefficients from memory, as listed in docs/methods/metabolism.md 6.2).
// - Hsu, Meindl & Gilhousen (1994), J. Appl. Meteorol. 33, 757-765: neutral power law U10 = Uz (10/z)^0.11 at sea.
// - Borges et al. (2004), Estuaries 27, 593-603: option for current-swept shallow water (docs/methods/metabolism.md 6.2).

export type Gas = 'CO2' | 'O2';

// Sc = A + B t + C t^2 + D t^3 + E t^4 (Wanninkhof 2014, Table 1, seawater) (from memory).
const SCHMIDT_COEFFS: Record<Gas, readonly [number, number, number, number, number]> = {
  CO2: [2116.8, -136.25, 4.7353, -0.092307, 0.0007555],
  O2: [1920.4, -135.6, 5.2122, -0.10939, 0.00093777],
};

/**
 * Schmidt number (dimensionless) of a gas in seawater at S = 35.
 * Valid -2 to 40 degC. Check: Sc(CO2, 20 degC) = 668.3 and Sc(O2, 20 degC) = 568.2 (Wanninkhof 2014, Table 1;
 * from memory); Sc(CO2) = 660 near 20.2 degC by construction of the k660 normalisation.
 */
export function schmidtNumber(gas: Gas, tempC: number): number {
  const [a, b, c, d, e] = SCHMIDT_COEFFS[gas];
  const t = tempC;
  return a + t * (b + t * (c + t * (d + t * e)));
}

/** Hsu et al. (1994) neutral power-law exponent at sea (from memory). */
export const WIND_POWER_LAW_EXPONENT = 0.11;

/**
 * Wind speed at 10 m [m/s] from an anemometer at heightM [m]: U10 = Uz (10/z)^0.11.
 * Valid for near-neutral stability over the sea. Check: 5 m/s at 3 m gives 5 (10/3)^0.11 = 5.708 m/s (algebra).
 */
export function windAt10m(windMS: number, heightM: number): number {
  if (!(heightM > 0)) return windMS;
  return windMS * Math.pow(10 / heightM, WIND_POWER_LAW_EXPONENT);
}

/** Wanninkhof (2014) quadratic coefficient [cm/h per (m/s)^2] (from memory). */
export const W14_COEFF = 0.251;

/**
 * Gas transfer velocity normalised to Sc = 660 [cm/h]: k660 = 0.251 U10^2 (Wanninkhof 2014), U10 in m/s.
 * Valid for U10 about 3-15 m/s (long-term mean winds; used at all speeds here). Check: U10 = 10 m/s gives
 * 25.1 cm/h by definition of the fit.
 */
export function k660CmH(u10MS: number): number {
  return W14_COEFF * u10MS * u10MS;
}

/** cm/h to m/s. */
export const CM_H_TO_M_S = 1 / 3.6e5;

/**
 * Gas transfer velocity [m/s] of a gas at tempC from the 10 m wind [m/s]:
 * k = k660 (Sc/660)^(-1/2) / 3.6e5 (docs/methods/metabolism.md 6.2). Check: CO2 at 20 degC and U10 = 10 m/s gives
 * 25.1 (668.3/660)^-0.5 = 24.943 cm/h = 6.929e-5 m/s (algebra on Wanninkhof 2014).
 */
export function gasTransferVelocity(gas: Gas, tempC: number, u10MS: number): number {
  const sc = schmidtNumber(gas, tempC);
  return k660CmH(u10MS) * Math.pow(sc / 660, -0.5) * CM_H_TO_M_S;
}

/**
 * Option for calm, current-swept shallow flats (Borges et al. 2004, from memory):
 * k600 = 1.0 + 1.719 Ucm^0.5 h^-0.5 + 2.58 U10 [cm/h], Ucm the current in cm/s, h the depth in m;
 * scaled by (Sc/600)^(-1/2). Returns m/s. Check: U = 10 cm/s, h = 1 m, U10 = 0 gives k600 = 6.436 cm/h (algebra).
 */
export function gasTransferVelocityCurrent(
  gas: Gas,
  tempC: number,
  u10MS: number,
  currentMS: number,
  depthM: number,
): number {
  const uCm = Math.abs(currentMS) * 100;
  const k600 = 1.0 + (1.719 * Math.sqrt(uCm)) / Math.sqrt(Math.max(depthM, 1e-3)) + 2.58 * u10MS;
  return k600 * Math.pow(schmidtNumber(gas, tempC) / 600, -0.5) * CM_H_TO_M_S;
}

/**
 * O2 flux from water to air [umol m-2 s-1]: F = k rho (O2 - O2*) with k in m/s, rho in kg m-3, O2 in umol/kg
 * (docs/methods/metabolism.md 6.2). Positive = outgassing. Check: k = 1e-5, rho = 1025, O2 - O2* = 20 gives 0.205 (algebra).
 */
export function airSeaO2FluxUmolM2S(
  kMS: number,
  rhoKgM3: number,
  o2UmolKg: number,
  o2SatUmolKg: number,
): number {
  return kMS * rhoKgM3 * (o2UmolKg - o2SatUmolKg);
}

/**
 * CO2 flux from water to air [umol m-2 s-1]: F = k rho K0 (fCO2_w - fCO2_a), with K0 in mol kg-1 atm-1 and
 * fCO2 in uatm (K0 x uatm = umol/kg) (docs/methods/metabolism.md 6.2). Check: k = 1e-5, rho = 1025, K0 = 0.0284, dfCO2 = 100
 * gives 0.02911 (algebra).
 */
export function airSeaCo2FluxUmolM2S(
  kMS: number,
  rhoKgM3: number,
  k0MolKgAtm: number,
  fco2WaterUatm: number,
  fco2AirUatm: number,
): number {
  return kMS * rhoKgM3 * k0MolKgAtm * (fco2WaterUatm - fco2AirUatm);
}
