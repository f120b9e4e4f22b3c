// The threshold state machine of one (rule, station, sensor) series, on event time. Hysteresis (a clear limit
// beyond the raise limit) plus minimum durations keep it from flapping: a raise needs the limit breached on every
// observation for raiseAfterMs, a clear needs the clear limit passed on every observation for clearAfterMs, and
// values between the two limits hold the current state. Plain data so the engine can snapshot it as JSON.

import type { ThresholdRule } from './types.js';

export type ThresholdPhase = 'normal' | 'pending_raise' | 'raised' | 'pending_clear';

export interface ThresholdSeries {
  phase: ThresholdPhase;
  /** Start of the pending phase (first breaching / first clearing observation), ms. */
  sinceMs: number | null;
  /** Last observation used, ms (for the gap rule). */
  lastObsMs: number | null;
  /** When the current episode was raised, ms. */
  raisedAtMs: number | null;
}

export const newThresholdSeries = (): ThresholdSeries => ({
  phase: 'normal',
  sinceMs: null,
  lastObsMs: null,
  raisedAtMs: null,
});

export type ThresholdTransition = 'raised' | 'cleared' | null;

/**
 * Advances the series by one observation (finite value, times increasing) and returns the transition, if any.
 * Equality is neither a breach nor a clear: "below 2.0" breaches at 1.99 and "cleared above 2.5" clears at 2.51.
 * A gap longer than maxGapMs between used observations restarts a pending phase (the series in the gap is unknown).
 */
export function stepThreshold(
  s: ThresholdSeries,
  rule: ThresholdRule,
  tMs: number,
  value: number,
): ThresholdTransition {
  const breach = rule.dir === 'below' ? value < rule.limit : value > rule.limit;
  const clears = rule.dir === 'below' ? value > rule.clear : value < rule.clear;
  if (s.lastObsMs !== null && tMs - s.lastObsMs > rule.maxGapMs) {
    if (s.phase === 'pending_raise') s.phase = 'normal';
    if (s.phase === 'pending_clear') s.phase = 'raised';
  }
  s.lastObsMs = tMs;
  switch (s.phase) {
    case 'normal':
      if (!breach) return null;
      s.phase = 'pending_raise';
      s.sinceMs = tMs;
      return maybeRaise(s, rule, tMs);
    case 'pending_raise':
      if (!breach) {
        s.phase = 'normal';
        s.sinceMs = null;
        return null;
      }
      return maybeRaise(s, rule, tMs);
    case 'raised':
      if (!clears) return null;
      s.phase = 'pending_clear';
      s.sinceMs = tMs;
      return maybeClear(s, rule, tMs);
    case 'pending_clear':
      if (!clears) {
        s.phase = 'raised';
        s.sinceMs = null;
        return null;
      }
      return maybeClear(s, rule, tMs);
  }
}

function maybeRaise(s: ThresholdSeries, rule: ThresholdRule, tMs: number): ThresholdTransition {
  if (tMs - (s.sinceMs ?? tMs) < rule.raiseAfterMs) return null;
  s.phase = 'raised';
  s.sinceMs = null;
  s.raisedAtMs = tMs;
  return 'raised';
}

function maybeClear(s: ThresholdSeries, rule: ThresholdRule, tMs: number): ThresholdTransition {
  if (tMs - (s.sinceMs ?? tMs) < rule.clearAfterMs) return null;
  s.phase = 'normal';
  s.sinceMs = null;
  return 'cleared';
}
