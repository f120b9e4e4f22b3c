// The one retry helper: exponential backoff with full jitter (delay = random * min(maxMs, baseMs * 2^n)),
// acting only on errors marked retriable where they were created (libs/contract isRetriable). Programming
// errors (TypeError, RangeError, SyntaxError) and refusals (4xx other than 408/429) fail at once.
// Timers and randomness are injected so tests run without sleeping.
import { isRetriable } from '../../libs/contract/index.js';

export type Sleep = (ms: number, signal?: AbortSignal) => Promise<void>;

export const realSleep: Sleep = (ms, signal) =>
  new Promise<void>((resolve, reject) => {
    if (signal?.aborted) return reject(signal.reason as Error);
    const t = setTimeout(() => {
      signal?.removeEventListener('abort', onAbort);
      resolve();
    }, ms);
    const onAbort = (): void => {
      clearTimeout(t);
      reject(signal?.reason as Error);
    };
    signal?.addEventListener('abort', onAbort, { once: true });
  });

export interface BackoffOptions {
  baseMs: number;
  maxMs: number;
  /** Uniform in [0, 1); inject a seeded one in tests. */
  random: () => number;
}

/** The wait before retry number `attempt` (0-based), at least `minMs` (e.g. from Retry-After). */
export function backoffDelayMs(attempt: number, o: BackoffOptions, minMs = 0): number {
  const cap = Math.min(o.maxMs, o.baseMs * 2 ** Math.min(attempt, 30));
  return Math.max(minMs, Math.floor(o.random() * cap));
}

export interface RetryOptions extends BackoffOptions {
  /** Attempts in all, the first one included; Infinity retries until aborted. */
  maxAttempts: number;
  sleep?: Sleep;
  signal?: AbortSignal;
  retriable?: (err: unknown) => boolean;
  onRetry?: (err: unknown, attempt: number, delayMs: number) => void;
}

/** A server's hint (Retry-After) carried on an error's detail, in ms. */
function hintMs(err: unknown): number {
  const d = (err as { detail?: { retryAfterMs?: unknown } } | null)?.detail?.retryAfterMs;
  return typeof d === 'number' && Number.isFinite(d) ? d : 0;
}

/** Runs `fn` until it resolves, a non-retriable error occurs, attempts run out, or the signal aborts. */
export async function retry<T>(fn: (attempt: number) => Promise<T>, o: RetryOptions): Promise<T> {
  const sleep = o.sleep ?? realSleep;
  const canRetry = o.retriable ?? isRetriable;
  for (let attempt = 0; ; attempt++) {
    try {
      return await fn(attempt);
    } catch (err) {
      if (!canRetry(err) || attempt + 1 >= o.maxAttempts || o.signal?.aborted) throw err;
      const delay = backoffDelayMs(attempt, o, hintMs(err));
      o.onRetry?.(err, attempt, delay);
      await sleep(delay, o.signal);
    }
  }
}
