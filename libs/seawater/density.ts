// Millero F.J. & Poisson A. (1981), Deep-Sea Res. 28A, 625-629: the one-atmosphere international equation of
// state of seawater (EOS-80), with the ITS-90 to IPTS-68 conversion t68 = 1.00024 t (Saunders 1990).

/**
 * Density of seawater at one atmosphere, rho(S, t, 0) [kg m-3]. Valid S 0.5-43, t -2 to 40 degC.
 * Check value: 1023.343 kg m-3 at S 35, t68 25 degC (EOS-80 check value, Fofonoff & Millard 1983,
 * UNESCO Tech. Pap. Mar. Sci. 44), from memory: verified against gsw in test/reference.
 */
export function densityEos80(salinity: number, tempC: number): number {
  const t = 1.00024 * tempC;
  const S = salinity;
  const rhoW =
    999.842594 +
    t * (6.793952e-2 + t * (-9.09529e-3 + t * (1.001685e-4 + t * (-1.120083e-6 + t * 6.536332e-9))));
  const A = 8.24493e-1 + t * (-4.0899e-3 + t * (7.6438e-5 + t * (-8.2467e-7 + t * 5.3875e-9)));
  const B = -5.72466e-3 + t * (1.0227e-4 - t * 1.6546e-6);
  const C = 4.8314e-4;
  return rhoW + A * S + B * S * Math.sqrt(S) + C * S * S;
}

/** The same with the temperature already on the IPTS-68 scale (for the published check value). */
export function densityEos80T68(salinity: number, t68C: number): number {
  return densityEos80(salinity, t68C / 1.00024);
}
