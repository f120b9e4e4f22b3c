// Error catalogue of services/scaleout (edge bridge, shore members and their state stores).
import { defineErrors, errorMessage, ReefdError } from '../../libs/contract/errors.js';

export const SCALEOUT_ERRORS = defineErrors('services/scaleout', {
  REEFD_SCALEOUT_BAD_SITE: 'the site id cannot name a state entry; site ids match the contract id pattern',
  REEFD_SCALEOUT_STATE_CORRUPT: {
    text: "a site's stored state could not be read or the state topic was not read to its end; check the brokers, or delete the entry to start the site cold",
    retriable: true,
  },
  REEFD_SCALEOUT_PARTITION_MOVED:
    "a site's stored state names another partition (the partition count changed?); never add partitions to a raw topic in service (deploy/SCALING.md 1)",
});
export type ScaleoutErrorCode = (typeof SCALEOUT_ERRORS.codes)[number];

/** An error of the scale-out stores (kept as its own class so callers can test `instanceof`). */
export class ScaleoutError extends ReefdError<ScaleoutErrorCode> {
  constructor(code: ScaleoutErrorCode, what: string) {
    super(code, errorMessage(code, what, SCALEOUT_ERRORS.text(code)), {
      retriable: SCALEOUT_ERRORS.entries[code].retriable,
    });
    this.name = 'ScaleoutError';
  }
}
