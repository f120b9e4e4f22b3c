// Retry policy of the notifiers: errors say at creation whether a retry can help (NotifyError.retriable);
// nextRetryDelayMs turns an error and an attempt count into a delay. The backoff itself is the project's one
// helper (services/transport/backoff.ts: exponential with full jitter); only the outbox's rule for errors a retry
// cannot fix differs, and lives here.
import { backoffDelayMs } from '../transport/backoff.js';
import { ReefdError } from '../../libs/contract/index.js';
import type { NotifyErrorCode } from './errors.js';

/** A channel's failure: a code of the notifiers' catalogue and whether this case can be retried. */
export class NotifyError extends ReefdError<NotifyErrorCode> {
  constructor(code: NotifyErrorCode, message: string, retriable: boolean, options?: { cause?: unknown }) {
    super(code, `${code}: ${message}`, { retriable, cause: options?.cause });
    this.name = 'NotifyError';
  }
}

export interface RetryPolicy {
  /** First delay scale, ms. */
  readonly baseMs: number;
  /** Cap on any delay, ms. */
  readonly maxMs: number;
}

/** True when a retry of the same request may succeed (network trouble, 5xx, 429, time-outs). */
export function isRetriable(err: unknown): boolean {
  return err instanceof NotifyError && err.retriable;
}

/**
 * Delay before attempt `attempt + 1` (attempt counts failures so far, from 1). A retriable error backs off
 * exponentially with full jitter, never below baseMs / 2 so a flapping uplink is not hammered. Anything else
 * (a rejected request, a programming error) waits the full maxMs: an outbox must not drop an alert, so it keeps
 * retrying slowly while the error is reported, instead of giving up as other retry loops would.
 */
export function nextRetryDelayMs(
  err: unknown,
  attempt: number,
  policy: RetryPolicy,
  random: () => number,
): number {
  if (!isRetriable(err)) return policy.maxMs;
  const delay = backoffDelayMs(Math.max(0, attempt - 1), {
    baseMs: policy.baseMs,
    maxMs: policy.maxMs,
    random,
  });
  return Math.min(policy.maxMs, Math.max(policy.baseMs / 2, delay));
}
