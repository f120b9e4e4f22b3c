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
  REEFD_PROCESSOR_WORKER_EXIT: {
    text: "the processor's worker thread stopped; the daemon stops without acknowledging what it held, and a restart resumes from the last checkpoint (the log above it says why)",
    retriable: true,
  },
  REEFD_PROCESSOR_WORKER_CLOSED:
    'the processor worker was closed while a step was still waiting for it (the daemon is stopping); nothing to do',
  REEFD_PROCESSOR_IN_WORKER:
    "a processor call that only the in-process processor answers was made with the processor in its worker; call the worker's step instead (a programming error)",
});
export type DaemonErrorCode = (typeof DAEMON_ERRORS.codes)[number];
