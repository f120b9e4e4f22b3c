// Battery trend (docs/methods/faults.md 12.5): hours until the supply voltage reaches its cut-off, from the recent
// slope. The voltage is averaged in short bins (noise and the 0.01-V steps of a logger's ADC average out), a
// Theil-Sen line through the bin means of the last `windowMs` gives the slope and today's level (a cloud or a pump
// cycle moves a few bins, not the median slope), and the hours are (level - cut-off) / -slope. Plain JSON state.

import { theilSen } from './robust.js';

export interface BatteryTrendLimits {
  /** Span of the fit, ms (default 6 h). */
  readonly windowMs: number;
  /** Bin of the means, ms (default 15 min). */
  readonly binMs: number;
  /** Fewest bins with data before a trend is given (default 8: 2 h). */
  readonly minBins: number;
}

export const DEFAULT_BATTERY_TREND: BatteryTrendLimits = Object.freeze({
  windowMs: 6 * 3_600_000,
  binMs: 15 * 60_000,
  minBins: 8,
});

export interface BatteryTrendState {
  /** Bins, oldest first: [k, n, mean] each. */
  b: number[];
}

export const newBatteryTrend = (): BatteryTrendState => ({ b: [] });

export function batteryTrendAdd(
  s: BatteryTrendState,
  tMs: number,
  volts: number,
  lim: BatteryTrendLimits = DEFAULT_BATTERY_TREND,
): void {
  if (!Number.isFinite(volts)) return;
  const k = Math.floor(tMs / lim.binMs);
  const b = s.b;
  const last = b.length - 3;
  if (last >= 0 && b[last] === k) {
    const n = (b[last + 1] as number) + 1;
    b[last + 1] = n;
    b[last + 2] = (b[last + 2] as number) + (volts - (b[last + 2] as number)) / n;
    return;
  }
  if (last >= 0 && k < (b[last] as number)) return; // out of order: ignored
  b.push(k, 1, volts);
  const oldest = k - Math.ceil(lim.windowMs / lim.binMs);
  let drop = 0;
  while (drop < b.length && (b[drop] as number) < oldest) drop += 3;
  if (drop > 0) b.splice(0, drop);
}

export interface BatteryTrend {
  /** Fitted voltage at tMs, V. */
  readonly levelV: number;
  /** Slope, V per hour (negative when discharging). */
  readonly slopeVPerH: number;
  /** Hours until the fitted line reaches cutoffV: 0 when already below, Infinity when not falling. */
  readonly hoursToCutoff: number;
}

/** The trend at tMs, or null with too few bins in the window. */
export function batteryTrend(
  s: BatteryTrendState,
  tMs: number,
  cutoffV: number,
  lim: BatteryTrendLimits = DEFAULT_BATTERY_TREND,
): BatteryTrend | null {
  const x: number[] = [];
  const y: number[] = [];
  const fromK = Math.floor((tMs - lim.windowMs) / lim.binMs);
  for (let i = 0; i < s.b.length; i += 3) {
    const k = s.b[i] as number;
    if (k < fromK) continue;
    x.push(((k + 0.5) * lim.binMs - tMs) / 3_600_000); // hours before tMs (negative)
    y.push(s.b[i + 2] as number);
  }
  if (x.length < lim.minBins) return null;
  const line = theilSen(x, y);
  const levelV = line.intercept;
  const slopeVPerH = line.slope;
  const hoursToCutoff =
    levelV <= cutoffV ? 0 : slopeVPerH < 0 ? (levelV - cutoffV) / -slopeVPerH : Number.POSITIVE_INFINITY;
  return { levelV, slopeVPerH, hoursToCutoff };
}
