// Conservative totals from practical salinity, mol kg-SW-1 (docs/methods/carbonate.md 3.1).
// Lee K. et al. (2010), Geochim. Cosmochim. Acta 74, 1801-1811: total boron (default).
// Uppstrom L.R. (1974), Deep-Sea Res. 21, 161-162: total boron (option).
// Morris A.W. & Riley J.P. (1966), Deep-Sea Res. 13, 699-705: sulfate. Riley J.P. (1965), Deep-Sea Res. 12,
// 219-220: fluoride. Riley J.P. & Tongudai M. (1967), Chem. Geol. 2, 263-269: calcium.

/** Total boron, Lee et al. (2010): 4.326e-4 S/35 mol/kg (432.6 umol/kg at S 35). */
export function totalBoronLee2010(salinity: number): number {
  return (4.326e-4 * salinity) / 35;
}

/** Total boron, Uppstrom (1974): 4.157e-4 S/35 mol/kg (415.7 umol/kg at S 35). */
export function totalBoronUppstrom1974(salinity: number): number {
  return (4.157e-4 * salinity) / 35;
}

/** Total sulfate, Morris & Riley (1966): (0.14/96.062)(S/1.80655) mol/kg (0.02824 at S 35). */
export function totalSulfate(salinity: number): number {
  return (0.14 / 96.062) * (salinity / 1.80655);
}

/** Total fluoride, Riley (1965): (6.7e-5/18.998)(S/1.80655) mol/kg (6.83e-5 at S 35). */
export function totalFluoride(salinity: number): number {
  return (6.7e-5 / 18.998) * (salinity / 1.80655);
}

/**
 * Total calcium, Riley & Tongudai (1967): (0.02128/40.078)(S/1.80655) mol/kg (0.010287 at S 35), with the
 * atomic weight of Ca 40.078 g/mol. PyCO2SYS 1.8.3.4 divides by 40.087 (a legacy digit swap, 2.2e-4 lower);
 * the reference vectors pass our calcium to it explicitly so Omega compares like with like.
 */
export function totalCalcium(salinity: number): number {
  return (0.02128 / 40.078) * (salinity / 1.80655);
}
