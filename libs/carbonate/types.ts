// Public types of the carbonate library: inputs, options, results. Option values are our own descriptive
// names of the published fits (never numeric codes); the config schema builds its enums from
// CARBONATE_OPTION_NAMES.

/** Valid option values, one list per choice; the first entry of each list is the default. */
export const CARBONATE_OPTION_NAMES = {
  /** K1, K2 of carbonic acid: Lueker et al. (2000) total scale; Dickson & Millero (1987) refit of Mehrbach. */
  carbonicConstants: ['lueker2000', 'dickson-millero1987'],
  /** Total boron to salinity ratio: Lee et al. (2010); Uppstrom (1974). */
  boron: ['lee2010', 'uppstrom1974'],
  /**
   * KW of Millero (1995): 'millero1995' is the form of Dickson et al. (2007) treated as total scale
   * (docs/methods/carbonate.md 3.1, default); 'millero1995-sws' is Millero's seawater-scale form converted to
   * total, as in PyCO2SYS.
   */
  kw: ['millero1995', 'millero1995-sws'],
  /**
   * pCO2 <-> fCO2 of Weiss (1974): 'weiss1974' keeps the (1 - xCO2)^2 factor of the cross virial term
   * (docs/methods/carbonate.md 3.4, Dickson et al. 2007 SOP 24; default); 'weiss1974-dilute' sets xCO2 -> 0
   * there, as CO2SYS and PyCO2SYS do (fCO2 higher by about 4e-6 relative per 1000 uatm).
   */
  fugacity: ['weiss1974', 'weiss1974-dilute'],
} as const;

export type CarbonicConstantsOption = (typeof CARBONATE_OPTION_NAMES.carbonicConstants)[number];
export type BoronOption = (typeof CARBONATE_OPTION_NAMES.boron)[number];
export type KwOption = (typeof CARBONATE_OPTION_NAMES.kw)[number];
export type FugacityOption = (typeof CARBONATE_OPTION_NAMES.fugacity)[number];

export interface CarbonateOptions {
  carbonicConstants?: CarbonicConstantsOption;
  boron?: BoronOption;
  kw?: KwOption;
  fugacity?: FugacityOption;
}

/** Options with every choice made (defaults filled in). */
export interface ResolvedCarbonateOptions {
  readonly carbonicConstants: CarbonicConstantsOption;
  readonly boron: BoronOption;
  readonly kw: KwOption;
  readonly fugacity: FugacityOption;
}

export const DEFAULT_CARBONATE_OPTIONS: ResolvedCarbonateOptions = Object.freeze({
  carbonicConstants: 'lueker2000',
  boron: 'lee2010',
  kw: 'millero1995',
  fugacity: 'weiss1974',
});

/**
 * One carbonate calculation. Exactly two of taUmolKg, dicUmolKg, phTotal, pco2Uatm, fco2Uatm (pCO2 and fCO2
 * count as the same kind, so not both). pCO2 and fCO2 are wet-air values at the input temperature.
 */
export interface CarbonateInput {
  /** Practical salinity (PSS-78). */
  salinity: number;
  /** Temperature of the input measurement, degC (ITS-90). */
  tempC: number;
  /** Sea pressure of the input measurement, dbar (absolute minus atmospheric); default 0. */
  seaPressureDbar?: number;
  taUmolKg?: number;
  dicUmolKg?: number;
  /** pH on the total scale at the input conditions. */
  phTotal?: number;
  pco2Uatm?: number;
  fco2Uatm?: number;
  /** Total phosphate and silicate, umol/kg; default 0 (docs/methods/carbonate.md 3.1 omits them). */
  po4UmolKg?: number;
  sio4UmolKg?: number;
  /** Output (reporting) conditions; default the input conditions (docs/methods/carbonate.md 3.8). */
  outTempC?: number;
  outSeaPressureDbar?: number;
  /** Barometric pressure for the pCO2 <-> fCO2 virial correction, hPa; default 1013.25. */
  baroHpa?: number;
  /** Starting pH for the iterative pairs (warm start, e.g. the station's previous solution). */
  initialPh?: number;
}

/** A solved system, all at the output conditions. Flag 3 when a fit was used outside its t/S range. */
export interface CarbonateSolution {
  ok: true;
  flag: 1 | 3;
  taUmolKg: number;
  dicUmolKg: number;
  phTotal: number;
  /** pH on the free and seawater scales, same conditions. */
  phFree: number;
  phSws: number;
  pco2Uatm: number;
  fco2Uatm: number;
  co3UmolKg: number;
  hco3UmolKg: number;
  /** CO2* = CO2(aq) + H2CO3. */
  co2UmolKg: number;
  omegaAr: number;
  omegaCa: number;
  /** Revelle factor d ln fCO2 / d ln DIC at constant TA, t, S. */
  revelle: number;
  notes: string[];
}

export interface CarbonateFailure {
  ok: false;
  flag: 4;
  code: CarbonateErrorCode;
  reason: string;
}

export type CarbonateResult = CarbonateSolution | CarbonateFailure;

export type CarbonateErrorCode =
  | 'REEFD_CARBONATE_BAD_PAIR'
  | 'REEFD_CARBONATE_BAD_INPUT'
  | 'REEFD_CARBONATE_NO_ROOT'
  | 'REEFD_CARBONATE_NO_CONVERGENCE';

/** Published uncertainties of the constants (standard uncertainty, docs/methods/uncertainty.md 9.1 after Orr et al. 2018). */
export interface ConstantSigmas {
  pK0: number;
  pK1: number;
  pK2: number;
  pKB: number;
  pKW: number;
  pKspAr: number;
  pKspCa: number;
  /** Relative uncertainty of total boron (0.02 = 2 %). */
  btRel: number;
}

export const DEFAULT_CONSTANT_SIGMAS: Readonly<ConstantSigmas> = Object.freeze({
  pK0: 0.002,
  pK1: 0.0075,
  pK2: 0.015,
  pKB: 0.01,
  pKW: 0.01,
  pKspAr: 0.02,
  pKspCa: 0.02,
  btRel: 0.02,
});

/** Standard uncertainties of the inputs; omitted ones count as exact. */
export interface CarbonateSigmas {
  taUmolKg?: number;
  dicUmolKg?: number;
  phTotal?: number;
  pco2Uatm?: number;
  fco2Uatm?: number;
  tempC?: number;
  outTempC?: number;
  salinity?: number;
  po4UmolKg?: number;
  sio4UmolKg?: number;
  /** Constants' uncertainties; default DEFAULT_CONSTANT_SIGMAS, 'none' leaves them out. */
  constants?: Partial<ConstantSigmas> | 'none';
}

/** The outputs that carry an uncertainty. */
export const UNCERTAIN_OUTPUTS = [
  'taUmolKg',
  'dicUmolKg',
  'phTotal',
  'pco2Uatm',
  'fco2Uatm',
  'co3UmolKg',
  'hco3UmolKg',
  'co2UmolKg',
  'omegaAr',
  'omegaCa',
  'revelle',
] as const;

export type UncertainOutput = (typeof UNCERTAIN_OUTPUTS)[number];

export type CarbonateUncertaintyResult =
  | {
      ok: true;
      flag: 1 | 3;
      /** The central solution. */
      value: CarbonateSolution;
      /** One standard uncertainty per output (same units). */
      sigma: Record<UncertainOutput, number>;
      /** Each source's share of the variance of each output, (J_i sigma_i)^2 (same units squared). */
      contributions: Record<string, Record<UncertainOutput, number>>;
      /**
       * Signed sensitivities dy/dx_i per source (per unit of the source: umol/kg, uatm, degC, pK unit, or
       * relative BT). For station differences, which share constants, propagate the Jacobian of the
       * difference with these (docs/methods/uncertainty.md 9.1), not the difference of the sigmas.
       */
      jacobian: Record<string, Record<UncertainOutput, number>>;
    }
  | CarbonateFailure;
