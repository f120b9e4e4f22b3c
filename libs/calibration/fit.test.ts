import { describe, expect, it } from 'vitest';
import { solveCarbonate } from '../carbonate/index.js';
import { fitOptodeGain, fitPco2, medianWithin, pco2Reference, type Pair } from './fit.js';

const T0 = Date.UTC(2026, 6, 14);
const DAY = 86_400_000;
/** Seeded normal deviates for the tests (Park & Miller; Box-Muller). */
function normals(seed: number): () => number {
  let s = seed;
  const u = () => (s = (s * 48271) % 2147483647) / 2147483647;
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}
const target = (sensor: string, field: string, days = 10) => ({
  sensor,
  field,
  fromMs: T0,
  toMs: T0 + days * DAY,
});

describe('fitPco2', () => {
  it('finds a sensor reading 12 uatm high with a small drift, despite one bad bottle', () => {
    const n = normals(5);
    const pairs: Pair[] = [];
    for (let i = 0; i < 14; i++) {
      const tMs = T0 + (i * 10 * DAY) / 13;
      const truth = 420 + 60 * Math.sin(i);
      const days = (tMs - T0) / DAY;
      pairs.push({ tMs, reference: truth + 2 * n(), raw: truth + 12 + 0.3 * days + 1.5 * n() });
    }
    pairs[6]!.reference += 45; // a bottle with a bubble
    const r = fitPco2(target('back/co2', 'pco2_uatm'), pairs, { drift: true });
    if (!r.ok) throw new Error(r.reason);
    const [off, drift] = r.params;
    expect(off?.name).toBe('offset');
    expect(Math.abs(off!.value + 12)).toBeLessThan(3 * off!.se);
    expect(off!.se).toBeGreaterThan(0.3);
    expect(off!.se).toBeLessThan(3);
    expect(Math.abs(drift!.value + 0.3)).toBeLessThan(3 * drift!.se);
    expect(r.outliers).toBe(1);
    expect(r.rows.find((x) => x.tMs === pairs[6]!.tMs)?.weight).toBe(0);
    expect(r.entry).toMatchObject({
      sensor: 'back/co2',
      field: 'pco2_uatm',
      slope: 1,
      slope_drift_per_day: 0,
    });
    expect(r.entry.from).toBe('2026-07-14T00:00:00.000Z');
    // residuals of the good bottles are bottle noise (sd ~2.5), not the 12 uatm bias
    const good = r.rows.filter((x) => x.weight > 0).map((x) => Math.abs(x.residual));
    expect(Math.max(...good)).toBeLessThan(10);
  });

  it('refuses too few bottles, bottles bunched in time, and mostly-outlier bottles, saying why', () => {
    const mk = (days: number[]) =>
      days.map((d) => ({ tMs: T0 + d * DAY, raw: 412, reference: 400 + (d % 2) }));
    const few = fitPco2(target('back/co2', 'pco2_uatm'), mk([1, 5, 9]));
    expect(few.ok).toBe(false);
    if (!few.ok) {
      expect(few.code).toBe('REEFD_CALIBRATION_TOO_FEW');
      expect(few.reason).toBe('3 bottle-sensor pair(s) for back/co2; at least 4 are needed');
    }
    const bunched = fitPco2(target('back/co2', 'pco2_uatm'), mk([1, 1.1, 1.2, 1.3, 1.4]));
    expect(bunched.ok).toBe(false);
    if (!bunched.ok) {
      expect(bunched.code).toBe('REEFD_CALIBRATION_SPREAD');
      expect(bunched.reason).toMatch(/span 0.40 d; a drift needs at least 1 d/);
    }
    const shortOfRecord = fitPco2(target('back/co2', 'pco2_uatm', 30), mk([1, 2, 3, 4]));
    expect(!shortOfRecord.ok && shortOfRecord.reason).toMatch(/span 3.00 d of the sensor's 30.00 d record/);
    // without drift the bunched bottles fit an offset
    const offsetOnly = fitPco2(target('back/co2', 'pco2_uatm'), mk([1, 1.1, 1.2, 1.3, 1.4]), {
      drift: false,
    });
    expect(offsetOnly.ok && offsetOnly.params.map((p) => p.name)).toEqual(['offset']);
    expect(offsetOnly.ok && offsetOnly.entry.offset).toBeCloseTo(-10.8, 6); // mean of 401..401.4 - 412
    const messy = fitPco2(
      target('back/co2', 'pco2_uatm'),
      // four bottles agree; five scatter by 60-150 uatm either way
      [0, 1, 2, 3, 4, 5, 6, 7, 8].map((d) => ({
        tMs: T0 + d * DAY,
        raw: 400,
        reference: 400 + [0, 0, 0, 0, 80, -70, 150, -120, 60][d]!,
      })),
    );
    expect(messy.ok).toBe(false);
    if (!messy.ok) {
      // beyond the breakdown point the robust scale itself is inflated, so the scatter check refuses it
      expect(messy.code).toBe('REEFD_CALIBRATION_OUTLIERS');
      expect(messy.reason).toMatch(
        /^the bottles scatter by \d+\.\d uatm about the fit for back\/co2, more than the 15 uatm/,
      );
    }
  });
});

describe('drift: auto', () => {
  it('drops a drift within 2 SE of zero and refits a constant; keeps a clear one', () => {
    const n = normals(21);
    const flat = Array.from({ length: 12 }, (_, i) => ({
      tMs: T0 + i * 0.8 * DAY,
      raw: 400,
      reference: 388 + 2 * n(),
    }));
    const r = fitPco2(target('back/co2', 'pco2_uatm'), flat);
    if (!r.ok) throw new Error(r.reason);
    expect(r.params.map((p) => p.name)).toEqual(['offset']);
    expect(r.entry.drift_per_day).toBe(0);
    expect(Math.abs(r.driftDropped!.value)).toBeLessThanOrEqual(2 * r.driftDropped!.se);
    expect(Math.abs(r.entry.offset + 12)).toBeLessThan(3 * r.params[0]!.se);
    const rising = flat.map((p, i) => ({ ...p, raw: p.raw + 2 * i * 0.8 }));
    const d = fitPco2(target('back/co2', 'pco2_uatm'), rising);
    if (!d.ok) throw new Error(d.reason);
    expect(d.driftDropped).toBeUndefined();
    expect(d.entry.drift_per_day).toBeCloseTo(-2, 0);
  });
});

describe('fitOptodeGain', () => {
  it('recovers a gain drift of 1.5 %/day (the optode reads low as it fouls)', () => {
    const n = normals(9);
    const pairs: Pair[] = [];
    for (let i = 0; i < 12; i++) {
      const tMs = T0 + i * 0.9 * DAY + 3600_000 * (i % 5);
      const truth = 180 + 40 * Math.cos(i * 1.3);
      const days = (tMs - T0) / DAY;
      pairs.push({ tMs, reference: truth * (1 + 0.003 * n()), raw: truth * (1 - 0.015 * days) });
    }
    const r = fitOptodeGain(target('flat/o2', 'o2_umol_l', 10), pairs);
    if (!r.ok) throw new Error(r.reason);
    const [slope, sd] = r.params;
    expect(slope?.name).toBe('slope');
    expect(slope!.value).toBeCloseTo(1, 1);
    // 1/(1 - 0.015 d) is nearly linear over 10 days: its best line rises ~1.7 %/day
    expect(sd!.value).toBeGreaterThan(0.015);
    expect(sd!.value).toBeLessThan(0.019);
    expect(r.entry.offset).toBe(0);
    expect(r.entry.drift_per_day).toBe(0);
    // corrected values agree with the references to ~0.5 % (the noise plus the curvature)
    for (const row of r.rows) expect(Math.abs(row.residual / row.reference)).toBeLessThan(0.012);
  });
});

describe('pco2Reference', () => {
  it('returns the pCO2 whose DIC the bottle has (round trip through libs/carbonate)', () => {
    const opts = { carbonicConstants: 'lueker2000', boron: 'lee2010' } as const;
    const s = solveCarbonate({ salinity: 35.2, tempC: 27.3, taUmolKg: 2290, pco2Uatm: 455 }, opts);
    if (!s.ok) throw new Error('solve');
    expect(pco2Reference({ taUmolKg: 2290, dicUmolKg: s.dicUmolKg, salinity: 35.2 }, 27.3, opts)).toBeCloseTo(
      455,
      6,
    );
    // the same water 1 degC warmer holds ~4 % more pCO2 (Takahashi et al. 1993: 4.23 %/degC)
    const warm = pco2Reference({ taUmolKg: 2290, dicUmolKg: s.dicUmolKg, salinity: 35.2 }, 28.3, opts)!;
    expect(warm / 455 - 1).toBeGreaterThan(0.038);
    expect(warm / 455 - 1).toBeLessThan(0.046);
  });
});

describe('medianWithin', () => {
  it('takes the median of the readings inside the window, none outside', () => {
    const t = [0, 60, 120, 180, 240, 900];
    const v = [1, 100, 3, 2, 4, 50];
    expect(medianWithin(t, v, 120, 120)).toBe(3); // 0..240 -> [1, 100, 3, 2, 4]
    expect(medianWithin(t, v, 120, 60)).toBe(3); // [100, 3, 2]
    expect(medianWithin(t, v, 600, 100)).toBeUndefined();
  });
});

describe('fit refusals past the outlier check', () => {
  it('refuses when the good bottles are fewer than half, even with a tight scale', () => {
    // five bottles on the line, six far off in both directions (the robust fit can lock onto the five)
    const ys = [0, 0, 0, 0, 0, 8, -9, 10, -11, 12, -13];
    const pairs = ys.map((y, d) => ({ tMs: T0 + d * DAY, raw: 400, reference: 400 + y * 40 }));
    const r = fitPco2(target('back/co2', 'pco2_uatm', 11), pairs);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('REEFD_CALIBRATION_OUTLIERS');
  });
});
