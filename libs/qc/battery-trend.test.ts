import { describe, expect, it } from 'vitest';
import { createRng } from '../simulator/index.js';
import { batteryTrend, batteryTrendAdd, newBatteryTrend } from './index.js';

const MIN = 60_000;
const H = 3_600_000;
const T0 = Date.UTC(2026, 6, 1);

describe('battery trend: hours to the cut-off from the recent slope (docs/methods/faults.md 12.5)', () => {
  it('reads a steady fall through noise and ADC steps (hand-computed: 12.3 V at -0.1 V/h to 11.5 V is 8 h)', () => {
    const s = newBatteryTrend();
    const rng = createRng(4);
    let tr;
    for (let m = 0; m <= 6 * 60; m += 5) {
      const v = Math.round((12.9 - (0.1 * m) / 60 + 0.02 * rng.normal()) * 100) / 100;
      batteryTrendAdd(s, T0 + m * MIN, v);
      tr = batteryTrend(s, T0 + m * MIN, 11.5);
    }
    expect(tr!.slopeVPerH).toBeCloseTo(-0.1, 2);
    expect(tr!.levelV).toBeCloseTo(12.3, 1);
    expect(tr!.hoursToCutoff).toBeGreaterThan(7.5);
    expect(tr!.hoursToCutoff).toBeLessThan(8.5);
  });
  it('is robust to a cloud: a 1-h dip of 0.3 V on a steady battery leaves it far from a warning', () => {
    const s = newBatteryTrend();
    let tr;
    for (let m = 0; m <= 6 * 60; m += 5) {
      batteryTrendAdd(s, T0 + m * MIN, m > 240 && m < 300 ? 12.3 : 12.6);
      tr = batteryTrend(s, T0 + m * MIN, 11.5);
    }
    expect(tr!.hoursToCutoff).toBe(Number.POSITIVE_INFINITY);
  });
  it('gives no trend under minBins of data, 0 below the cut-off, and holds a bounded number of bins', () => {
    const s = newBatteryTrend();
    batteryTrendAdd(s, T0, 12.6);
    expect(batteryTrend(s, T0, 11.5)).toBeNull();
    for (let m = 0; m <= 48 * 60; m += 1) batteryTrendAdd(s, T0 + m * MIN, 11 - m * 1e-5);
    expect(batteryTrend(s, T0 + 48 * H, 11.5)!.hoursToCutoff).toBe(0);
    expect(s.b.length / 3).toBeLessThanOrEqual(25); // 6 h of 15-min bins plus the one being filled
  });
});
