// Water properties carried across the reef: the tracers, their offshore values, and the one place where the
// carbonate system is speciated (libs/carbonate's solveCarbonate, default options: Lueker et al. 2000 K1 K2,
// Lee et al. 2010 boron; science 3).
import { k0, solveCarbonate } from '../carbonate/index.js';
import { densityEos80, o2SolubilityUmolKg } from '../seawater/index.js';
import { SIMULATOR_ERRORS } from './errors.js';

/** O2 umol/kg to mg/L at density rho (kg m-3): x rho/1000 / 31.2512 (1000/31.9988 umol per mg, science 2.3). */
export function o2MgL(o2UmolKg: number, rhoKgM3: number): number {
  return (o2UmolKg * rhoKgM3) / 1000 / (1000 / 31.9988);
}

/** Conservative and biological tracers of one parcel of water. */
export interface Water {
  tempC: number;
  sal: number;
  o2UmolKg: number;
  taUmolKg: number;
  dicUmolKg: number;
}

export const TRACERS = ['tempC', 'sal', 'o2UmolKg', 'taUmolKg', 'dicUmolKg'] as const;
export type Tracer = (typeof TRACERS)[number];

export interface CarbonateState {
  phTotal: number;
  pco2Uatm: number;
  co3UmolKg: number;
  omegaAr: number;
  omegaCa: number;
}

/** The carbonate state of a parcel (TA + DIC in). Throws REEFD_SIMULATOR_CARBONATE if the solver finds no
 * root, which only a model error upstream (a negative DIC, say) can cause. */
export function speciate(w: Water): CarbonateState {
  const r = solveCarbonate({ salinity: w.sal, tempC: w.tempC, taUmolKg: w.taUmolKg, dicUmolKg: w.dicUmolKg });
  if (!r.ok) {
    throw SIMULATOR_ERRORS.error(
      'REEFD_SIMULATOR_CARBONATE',
      `no carbonate solution for TA ${w.taUmolKg}, DIC ${w.dicUmolKg}, S ${w.sal}, t ${w.tempC}`,
    );
  }
  return {
    phTotal: r.phTotal,
    pco2Uatm: r.pco2Uatm,
    co3UmolKg: r.co3UmolKg,
    omegaAr: r.omegaAr,
    omegaCa: r.omegaCa,
  };
}

/** CO2 solubility K0, mol kg-1 atm-1 (Weiss 1974). */
export function co2SolubilityMolKgAtm(w: Water): number {
  return k0(w.sal, w.tempC);
}

export function density(w: Water): number {
  return densityEos80(w.sal, w.tempC);
}

export function o2Saturation(w: Water): number {
  return o2SolubilityUmolKg(w.sal, w.tempC);
}

/** Offshore water: TA from salinity (the site's alkalinity rule), DIC fixed by an offshore pCO2. */
export function offshoreDicAt(taUmolKg: number, pco2Uatm: number, sal: number, tempC: number): number {
  const r = solveCarbonate({ salinity: sal, tempC, taUmolKg, pco2Uatm });
  if (!r.ok)
    throw SIMULATOR_ERRORS.error(
      'REEFD_SIMULATOR_CARBONATE',
      `offshore water has no solution (${r.reason ?? 'unknown'})`,
    );
  return r.dicUmolKg;
}
