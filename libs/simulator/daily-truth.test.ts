import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../contract/index.js';
import { simulateMessages, type DailyTruth, type TransectTruth } from './index.js';

const parsed = parseConfigText(
  readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
);
if (!parsed.ok) throw new Error('demo config invalid');
const config = parsed.config;

describe('daily truth: the model community rates integrated over local days', () => {
  // 10:00 UTC is local midnight at UTC-10; 34 h give one whole local day and one cut short.
  const startMs = Date.UTC(2026, 2, 1, 10);
  const { truth } = simulateMessages(config, {
    startMs,
    durationMs: 34 * 3.6e6,
    seed: 3,
    faults: false,
    timeZone: 'Etc/GMT+10',
  });
  const daily = truth.filter((t): t is DailyTruth => t.kind === 'daily');

  it('gives only the whole local day, once per transect', () => {
    expect(daily.map((d) => `${d.day}/${d.transect}`)).toEqual(['2026-03-01/outer', '2026-03-01/inner']);
    expect(daily[0]!.t).toBe('2026-03-01T10:00:00.000Z');
    expect(daily[0]!.hours).toBe(24);
  });

  it('R is the community respiration (19 mmol m-2 h-1) over 24 h; GPP = NCP + R; NEC = day + night', () => {
    for (const d of daily) {
      expect(d.r_mmol_m2_d).toBeCloseTo(24 * 19, 6);
      expect(d.gpp_mmol_m2_d - d.r_mmol_m2_d).toBeCloseTo(d.ncp_mmol_m2_d, 2);
      expect(d.nec_day_mmol_m2_d + d.nec_night_mmol_m2_d).toBeCloseTo(d.nec_mmol_m2_d, 2);
      // Night NEC is the 2 mmol m-2 h-1 night rate over roughly 11.5 h of darkness.
      expect(d.nec_night_mmol_m2_d).toBeGreaterThan(2 * 10.5);
      expect(d.nec_night_mmol_m2_d).toBeLessThan(2 * 12.5);
      expect(d.gpp_mmol_m2_d).toBeGreaterThan(300);
    }
  });

  it('agrees with the 10-minute transect truth integrated by the trapezoid rule (within 1 %)', () => {
    for (const d of daily) {
      const rows = truth.filter(
        (t): t is TransectTruth =>
          t.kind === 'transect' &&
          t.transect === d.transect &&
          Date.parse(t.t) >= startMs &&
          Date.parse(t.t) <= startMs + 24 * 3.6e6,
      );
      let ncp = 0;
      for (let i = 1; i < rows.length; i++) {
        const h = (Date.parse(rows[i]!.t) - Date.parse(rows[i - 1]!.t)) / 3.6e6;
        ncp += 0.5 * h * (rows[i]!.ncp_mmol_m2_h + rows[i - 1]!.ncp_mmol_m2_h);
      }
      expect(Math.abs(ncp - d.ncp_mmol_m2_d) / d.gpp_mmol_m2_d).toBeLessThan(0.01);
    }
  });
});
