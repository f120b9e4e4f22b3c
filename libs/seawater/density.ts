// Millero F.J. & Poisson A. (1981), Deep-Sea Res. 28A, 625-629: international one-atmosphere equation of
// state of seawater (EOS-80 at p = 0), with the ITS-90 to IPTS-68 step t68 = 1.00024 t90 (Saunders 1990).

/**
 * Density of seawater at one atmosphere, kg m-3, from practical salinity S and t (degC, ITS-90).
 * Valid S 0.5-43, t -2 to 40 degC. Check value: 1023.343 kg m-3 at S 35, t68 = 25 degC
 * (EOS-80, Millero & Poisson 1981; density.test.ts). Compared with TEOS-10 (gsw 3.6.23, Roquet et al.
 * 2015 75-term density at SA = SR) in test/reference/seawater.test.ts: they agree within 0.01 %.
 */
export function densityEos80(salinity: number, tempC: number): number {
  const t = 1.00024 * tempC;
  const s = salinity;
  const rhoW =
    999.842594 +
    t * (6.793952e-2 + t * (-9.09529e-3 + t * (1.001685e-4 + t * (-1.120083e-6 + t * 6.536332e-9))));
  const a = 8.24493e-1 + t * (-4.0899e-3 + t * (7.6438e-5 + t * (-8.2467e-7 + t * 5.3875e-9)));
  const b = -5.72466e-3 + t * (1.0227e-4 - t * 1.6546e-6);
  const c = 4.8314e-4;
  return rhoW + a * s + b * s * Math.sqrt(s) + c * s * s;
}
