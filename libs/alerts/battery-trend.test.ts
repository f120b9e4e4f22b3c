import { describe, expect, it } from 'vitest';
import { createAlertEngine, type AlertRecord } from './index.js';

const MIN = 60_000;
const H = 3_600_000;
const T0 = Date.UTC(2026, 6, 1);

/** A pCO2 logger's supply every 10 min: steady at 12.6 V for 6 h, then falling 0.12 V/h (cut-off 11.5 V). */
function run(warnHours?: number): AlertRecord[] {
  const e = createAlertEngine(
    warnHours === undefined ? undefined : { faults: { battery: { warn_hours: warnHours } } },
    'ornen-reef',
  );
  const out: AlertRecord[] = [];
  for (let m = 0; m <= 20 * 60; m += 10) {
    const v = m < 360 ? 12.6 : 12.6 - (0.12 * (m - 360)) / 60;
    out.push(...e.observe('pco2.battery_v', 'flat', 'co2-flat', T0 + m * MIN, Math.round(v * 100) / 100, 1));
  }
  return out;
}

describe('battery_trend: a warning hours before the cut-off (docs/methods/faults.md 12.5)', () => {
  it('warns when the hours to 11.5 V stay under 6 h for 10 min, well before the threshold alert', () => {
    const out = run();
    const warn = out.find((a) => a.rule === 'battery_trend')!;
    const low = out.find((a) => a.rule === 'battery')!;
    expect(warn).toMatchObject({
      class: 'fault',
      fault: 'battery',
      state: 'raised',
      limit: 6,
      sensor: 'co2-flat',
    });
    expect(warn.value!).toBeGreaterThan(0);
    expect(warn.value!).toBeLessThan(6);
    // The fall reaches 11.5 V at 6 h + 1.1 / 0.12 h = 15.2 h (hand-computed); the threshold rule raises 10 min later.
    expect(Date.parse(low.t) - T0).toBeGreaterThan(15 * H);
    expect(Date.parse(low.t) - Date.parse(warn.t)).toBeGreaterThan(3 * H);
    expect(out.filter((a) => a.rule === 'battery_trend')).toHaveLength(1);
  });
  it('is off with warn_hours: 0', () => {
    expect(run(0).filter((a) => a.rule === 'battery_trend')).toEqual([]);
  });
  it('clears when the battery is replaced and lists the warning among active alerts meanwhile', () => {
    const e = createAlertEngine(undefined, 'ornen-reef');
    const out: AlertRecord[] = [];
    for (let m = 0; m <= 14 * 60; m += 10) {
      const v = m < 720 ? 12.6 - (0.12 * m) / 60 : 13.1; // swapped at 12 h
      out.push(...e.observe('pco2.battery_v', 'flat', 'co2-flat', T0 + m * MIN, v, 1));
      if (m === 700) expect(e.active().map((a) => a.rule)).toContain('battery_trend');
    }
    const states = out.filter((a) => a.rule === 'battery_trend').map((a) => a.state);
    expect(states).toEqual(['raised', 'cleared']);
  });
});
