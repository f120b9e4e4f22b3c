// The battery trend warning (rule `battery_trend`, fault `battery`, docs/methods/faults.md 12.5): raised when the
// hours to the kind's cut-off voltage, from the recent slope of libs/qc batteryTrend(), stay under `warnHours` for
// `persistMs`; cleared when they are back over twice that (hysteresis) or the voltage stops falling. It warns
// before the `battery` threshold rule, which still raises at the cut-off itself. Plain JSON state per sensor.

import { batteryTrend, batteryTrendAdd, newBatteryTrend, type BatteryTrendState } from '../qc/index.js';

export interface BatteryWarnSeries {
  trend: BatteryTrendState;
  /** First reading of the current run under the horizon, ms. */
  pendingSinceMs: number | null;
  raisedAtMs: number | null;
  lastMs: number | null;
}

export const newBatteryWarnSeries = (): BatteryWarnSeries => ({
  trend: newBatteryTrend(),
  pendingSinceMs: null,
  raisedAtMs: null,
  lastMs: null,
});

export interface BatteryWarnStep {
  readonly transition: 'raised' | 'cleared' | null;
  /** Hours to the cut-off now (Infinity when not falling), or null without enough data. */
  readonly hours: number | null;
}

/** Feeds one supply voltage at tMs (times increasing) and returns the transition it causes, if any. */
export function stepBatteryWarning(
  s: BatteryWarnSeries,
  cfg: { warnHours: number; persistMs: number },
  cutoffV: number,
  tMs: number,
  volts: number,
): BatteryWarnStep {
  if (!Number.isFinite(volts) || (s.lastMs !== null && tMs <= s.lastMs))
    return { transition: null, hours: null };
  s.lastMs = tMs;
  batteryTrendAdd(s.trend, tMs, volts);
  const tr = batteryTrend(s.trend, tMs, cutoffV);
  if (tr === null) return { transition: null, hours: null };
  const hours = tr.hoursToCutoff;
  if (s.raisedAtMs === null) {
    // Under the horizon but not yet at the cut-off: below it, the threshold rule speaks.
    if (hours > 0 && hours < cfg.warnHours) {
      s.pendingSinceMs ??= tMs;
      if (tMs - s.pendingSinceMs >= cfg.persistMs) {
        s.raisedAtMs = tMs;
        s.pendingSinceMs = null;
        return { transition: 'raised', hours };
      }
    } else s.pendingSinceMs = null;
    return { transition: null, hours };
  }
  if (hours > 2 * cfg.warnHours) {
    s.raisedAtMs = null;
    return { transition: 'cleared', hours };
  }
  return { transition: null, hours };
}
