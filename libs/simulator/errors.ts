// Error catalogue of libs/simulator: the fictional reef model refuses to go on when its water leaves the range
// the carbonate solver covers (a bug in its rates, never something a field team meets).
import { defineErrors } from '../contract/errors.js';

export const SIMULATOR_ERRORS = defineErrors('libs/simulator', {
  REEFD_SIMULATOR_CARBONATE:
    'the reef model produced water with no carbonate solution; check the model rates (libs/simulator/README.md)',
  REEFD_SIMULATOR_FORWARD:
    "the reef model's forward budget left the carbonate solver's range; check the model rates and the scenario",
});
export type SimulatorErrorCode = (typeof SIMULATOR_ERRORS.codes)[number];
