// The daemon's record bus: derived records and operational alerts, published once and read by whoever
// subscribed (the dashboard, the notifier). A subscriber that throws is logged and kept; it never stops the
// intake or another subscriber. Subscribing returns the unsubscribe function, so a part that stops leaves
// nothing behind.
import type { DerivedRecord } from '../../libs/contract/index.js';

export interface Bus<T> {
  subscribe(fn: (event: T) => void): () => void;
  publish(event: T): void;
  /** Subscribers now listening (for tests and status). */
  size(): number;
}

export type RecordBus = Bus<readonly DerivedRecord[]>;

export function createBus<T>(onError: (err: unknown) => void): Bus<T> {
  const subscribers = new Set<(event: T) => void>();
  return {
    subscribe(fn) {
      // A wrapper per subscription: the same function subscribed twice is two subscriptions.
      const entry = (e: T) => fn(e);
      subscribers.add(entry);
      return () => void subscribers.delete(entry);
    },
    publish(event) {
      for (const fn of subscribers) {
        try {
          fn(event);
        } catch (err) {
          onError(err);
        }
      }
    },
    size: () => subscribers.size,
  };
}
