// Error catalogue of libs/carbonate: every code a result or exception can carry, what it means and how to
// fix it. errors.test.ts keeps this list, the CarbonateErrorCode type and the code in sync.
import { defineErrors } from '../contract/errors.js';
import type { CarbonateErrorCode } from './types.js';

export const CARBONATE_ERRORS = defineErrors('libs/carbonate', {
  REEFD_CARBONATE_BAD_PAIR:
    'Not exactly two of TA, DIC, pH, pCO2/fCO2 were given (pCO2 and fCO2 are one kind). Give exactly two.',
  REEFD_CARBONATE_BAD_INPUT:
    'An input is not a finite number or is outside the domain the solver accepts (S 0-50, t -3 to 50 degC, P 0-12000 dbar, pH 3-12, DIC and pCO2 > 0). Check units (umol/kg, uatm, degC, dbar).',
  REEFD_CARBONATE_NO_ROOT:
    'The inputs have no physical solution with pH in 3-12 (e.g. DIC <= CO2*, or TA below the non-carbonate alkalinity). Check that both values belong to the same water and use the stated units.',
  REEFD_CARBONATE_NO_CONVERGENCE:
    'Reserved: the root finder did not converge in 100 steps. The bracketed Newton cannot fail this way on a sign change, so seeing it is a bug; report the inputs.',
  REEFD_CARBONATE_BAD_OPTION:
    'An option name (carbonicConstants, boron, kw, fugacity) is not one of CARBONATE_OPTION_NAMES. Thrown by equilibriumConstants; solveCarbonate returns it as REEFD_CARBONATE_BAD_INPUT.',
});

// Every code a carbonate result can carry is in the catalogue (a compile error names one that is not).
type Uncatalogued = Exclude<CarbonateErrorCode, (typeof CARBONATE_ERRORS.codes)[number]>;
const _allCatalogued: [Uncatalogued] extends [never] ? true : Uncatalogued = true;
