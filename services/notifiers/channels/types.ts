import type { NotificationMessage } from '../messages.js';
import type { Severity } from '../../../libs/alerts/index.js';

/** A delivery channel. send() resolves once the peer accepted the message, or throws (NotifyError when known). */
export interface Channel {
  readonly id: string;
  /** Alerts below this severity are not sent on this channel (default info: everything). */
  readonly minSeverity?: Severity;
  /** Per-channel rate limit; default the notifier's. */
  readonly rateLimit?: { readonly maxMessages: number; readonly perMs: number };
  send(message: NotificationMessage): Promise<void>;
}
