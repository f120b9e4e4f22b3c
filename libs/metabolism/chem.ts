// The only door to libs/seawater and libs/carbonate: thin bindings to their public index, so that the metabolism
// code reads in its own units and the hot path reuses equilibrium constants across the inverse's iterations.

import {
  DEFAULT_CONSTANT_SIGMAS,
  equilibriumConstants,
  fco2FromPco2,
  pco2FromXco2,
  SOLVE_OK,
  solveTaDicInto,
  solveTaPco2Into,
  STATE,
  STATE_LENGTH,
  type EquilibriumConstants,
} from '../carbonate/index.js';
import { densityEos80, o2SolubilityAtPressureUmolKg } from '../seawater/index.js';

export type Constants = EquilibriumConstants;
export { DEFAULT_CONSTANT_SIGMAS, STATE, STATE_LENGTH };

/** Carbonate constants at the sea surface for practical salinity S and t degC (libs/carbonate defaults). */
export function constantsAt(salinity: number, tempC: number): Constants {
  return equilibriumConstants(salinity, tempC, 0);
}

/** rho(S, t, 0) [kg m-3], EOS-80 one-atmosphere (libs/seawater). */
export function densityKgM3(salinity: number, tempC: number): number {
  return densityEos80(salinity, tempC);
}

/** O2 solubility [umol/kg] at total pressure pressureAtm (Garcia & Gordon 1992, Benson & Krause 1984). */
export function o2SatUmolKg(salinity: number, tempC: number, pressureAtm: number): number {
  return o2SolubilityAtPressureUmolKg(salinity, tempC, pressureAtm);
}

/** fCO2 [uatm] from pCO2 [uatm] at the constants' temperature and baroHpa (Weiss 1974). */
export function fco2FromPco2Uatm(c: Constants, pco2Uatm: number, baroHpa: number): number {
  return fco2FromPco2(c, pco2Uatm, baroHpa);
}

/** Wet-air pCO2 [uatm] from dry xCO2 [ppm]: xCO2 (P - pw) (docs/methods/carbonate.md 3.4). */
export function pco2AirUatm(xco2Ppm: number, baroHpa: number, salinity: number, tempC: number): number {
  return pco2FromXco2(xco2Ppm, baroHpa, salinity, tempC);
}

/** TA + DIC [umol/kg] into `state` (STATE layout); false when the pair has no solution. */
export function solveTaDic(
  c: Constants,
  taUmolKg: number,
  dicUmolKg: number,
  baroHpa: number,
  state: Float64Array,
  ph0 = 8,
): boolean {
  return solveTaDicInto(c, taUmolKg, dicUmolKg, state, ph0, baroHpa) === SOLVE_OK;
}

/** TA [umol/kg] + pCO2 [uatm] into `state`; false when the pair has no solution. */
export function solveTaPco2(
  c: Constants,
  taUmolKg: number,
  pco2Uatm: number,
  baroHpa: number,
  state: Float64Array,
  ph0 = 8,
): boolean {
  return solveTaPco2Into(c, taUmolKg, pco2Uatm, state, ph0, baroHpa) === SOLVE_OK;
}
