// Public API of the carbonate library (docs/methods/carbonate.md 3; docs/methods/uncertainty.md 9.1). Other
// code imports only this file.

export type {
  BoronOption,
  CarbonateErrorCode,
  CarbonateFailure,
  CarbonateInput,
  CarbonateOptions,
  CarbonateResult,
  CarbonateSigmas,
  CarbonateSolution,
  CarbonateUncertaintyResult,
  FugacityOption,
  ConstantSigmas,
  CarbonicConstantsOption,
  KwOption,
  ResolvedCarbonateOptions,
  UncertainOutput,
} from './types.js';
export {
  CARBONATE_OPTION_NAMES,
  DEFAULT_CARBONATE_OPTIONS,
  DEFAULT_CONSTANT_SIGMAS,
  UNCERTAIN_OUTPUTS,
} from './types.js';
export type { EquilibriumConstants } from './equilibrium.js';
export {
  createConstants,
  equilibriumConstants,
  equilibriumConstantsInto,
  RANGE_BITS,
  resolveCarbonateOptions,
} from './equilibrium.js';
export { k0Weiss1974 } from './constants/weiss1974.js';
export {
  fco2FromPco2,
  fugacityFactorAt,
  pco2AtTemperatureTakahashi,
  pco2FromFco2,
  pco2FromXco2,
  STANDARD_BARO_HPA,
  xco2FromPco2,
} from './fugacity.js';
export {
  dicFromPhCo2,
  dicFromTaPh,
  fillState,
  nonCarbonateAlkalinity,
  PH_HI,
  PH_LO,
  phFromDicCo2,
  SOLVE_BAD_VALUE,
  SOLVE_NO_ROOT,
  SOLVE_OK,
  solvePhFromTaCo2,
  solvePhFromTaDic,
  solveTaDicInto,
  solveTaFco2Into,
  solveTaPco2Into,
  STATE,
  STATE_LENGTH,
  taFromDicPh,
} from './core.js';
export {
  hFromPh,
  phFreeToTotal,
  phSwsToTotal,
  phTotalToFree,
  phTotalToSws,
  solveCarbonate,
  solveWithConstants,
} from './solve.js';

import { k0Weiss1974 } from './constants/weiss1974.js';

/** K0 (mol kg-1 atm-1) at practical salinity S and t degC (Weiss 1974); ln K0 = -3.5617 at S 35, t 25. */
export function k0(salinity: number, tempC: number): number {
  return k0Weiss1974(salinity, tempC + 273.15);
}

export { carbonateUncertainty } from './uncertainty.js';
export { CARBONATE_ERRORS } from './errors.js';
