// Error catalogue of services/daemon: codes the daemon logs (warnings with `code`) beside the core
// catalogue's (libs/contract/errors.ts).
import { defineErrors } from '../../libs/contract/errors.js';

export const DAEMON_ERRORS = defineErrors('services/daemon', {
  REEFD_SENSOR_REBOOT:
    "a sensor's seq counter started again (a logger reboot); its data is kept, nothing to do unless it repeats",
  REEFD_CHECKPOINT_DEFERRED: {
    text: 'the outputs did not settle in time, so the checkpoint was kept as it was; the next one retries',
    retriable: true,
  },
});
export type DaemonErrorCode = (typeof DAEMON_ERRORS.codes)[number];
