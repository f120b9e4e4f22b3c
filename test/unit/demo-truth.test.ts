// The demo scored against the simulator's truth: a day of the fictional Ornen Reef without scripted faults
// runs through the processor, and the derived records are compared with what the reef model held.
// Tolerances follow issues 4-5 where the demo's conditions match them; where the demo is harder than those
// synthetic checks (sensor noise, a lagoon sea shorter than the pressure cutoff) the bound is wider and says why.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import { simulateMessages, type StationTruth, type TransectTruth } from '../../libs/simulator/index.js';
import { parseMessage } from '../../libs/contract/index.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config invalid');
const config = parsed.config;
const sim = simulateMessages(config, {
  startMs: Date.UTC(2026, 5, 10),
  durationMs: 24 * 3600_000,
  seed: 5,
  faults: false,
});
const processor = createProcessor(config);
const records: DerivedRecord[] = [];
for (const m of sim.messages) {
  const r = parseMessage(m.topic, JSON.stringify(m.payload));
  if (!r.ok) throw new Error(`${m.topic}: ${r.reason}`);
  records.push(...processor.push(r.message, m.tMs + 300).records);
}
const stations = sim.truth.filter((t): t is StationTruth => t.kind === 'station');
const transects = sim.truth.filter((t): t is TransectTruth => t.kind === 'transect');

function nearest<T extends { t: string }>(rows: T[], tMs: number): T {
  let best = rows[0]!;
  let d = Infinity;
  for (const r of rows) {
    const dd = Math.abs(Date.parse(r.t) - tMs);
    if (dd < d) [best, d] = [r, dd];
  }
  return best;
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1] as number;
const truthAt = (station: string, t: string) =>
  nearest(
    stations.filter((s) => s.station === station),
    Date.parse(t),
  );
const num = (r: DerivedRecord, k: string) => r[k as keyof DerivedRecord] as unknown as number | null;

describe('waves against the truth (issue 4)', () => {
  const waves = records.filter((r) => r.type === 'waves' && num(r, 'hm0_m') !== null);
  const err = (k: 'hm0_m' | 'tp_s' | 'depth_m', st?: (s: string) => boolean) =>
    waves
      .filter((w) => st === undefined || st(w.station as string))
      .map((w) =>
        Math.abs((num(w, k)! - truthAt(w.station as string, w.t)[k]) / truthAt(w.station as string, w.t)[k]),
      );

  it('derives a waves record from every burst', () => {
    expect(waves.length).toBe(records.filter((r) => r.type === 'waves').length);
    expect(waves.length).toBe(6 * 48);
  });
  it('Hm0 within 3 % (median) where the sea is inside the pressure cutoff', () => {
    const e = err('hm0_m', (s) => s !== 'lagoon');
    console.log(`demo vs truth: Hm0 median error ${(100 * median(e)).toFixed(1)} % over ${e.length} bursts`);
    expect(median(e)).toBeLessThan(0.03);
  });
  it('Hm0 within 10 % in the lagoon, whose short wind sea loses its tail above the cutoff (docs/methods/waves.md 4.3)', () => {
    expect(median(err('hm0_m', (s) => s === 'lagoon'))).toBeLessThan(0.1);
  });
  it('Tp within 5 % and the mean depth within 1 % (median)', () => {
    expect(median(err('tp_s'))).toBeLessThan(0.05);
    expect(median(err('depth_m'))).toBeLessThan(0.01);
  });
});

describe('currents against the truth (issue 4)', () => {
  const all = records.filter((r) => r.type === 'current');
  const valid = all.filter((r) => num(r, 'east_m_s') !== null);
  it('keeps most ensembles of the shallow flat ADCPs valid', () => {
    expect(valid.length / all.length).toBeGreaterThan(0.7);
  });
  it('the depth-averaged velocity within 1 cm/s (median)', () => {
    const e = valid.map((c) =>
      Math.hypot(
        num(c, 'east_m_s')! - truthAt(c.station as string, c.t).east_m_s,
        num(c, 'north_m_s')! - truthAt(c.station as string, c.t).north_m_s,
      ),
    );
    console.log(
      `demo vs truth: current vector error median ${(100 * median(e)).toFixed(2)} cm/s over ${e.length}`,
    );
    expect(median(e)).toBeLessThan(0.01);
  });
  it('flat currents of 0.01-0.26 m/s and crest currents of 0.1-0.5 m/s (common practice)', () => {
    for (const c of valid.filter((r) => r.station === 'flat' || r.station === 'back')) {
      expect(num(c, 'speed_m_s')).toBeGreaterThan(0.005);
      expect(num(c, 'speed_m_s')).toBeLessThan(0.26);
    }
    const crest = valid.filter((r) => r.station === 'crest').map((r) => num(r, 'speed_m_s')!);
    expect(median(crest)).toBeGreaterThan(0.1);
    expect(median(crest)).toBeLessThan(0.5);
  });
});

describe('metabolism against the truth (issue 5)', () => {
  for (const id of ['outer', 'inner'] as const) {
    const flux = records.filter((r) => r.type === 'flux' && r.transect === id);
    const valid = flux.filter((r) => r.valid === true);
    const truth = transects.filter((t) => t.transect === id);
    const pairs = valid.map((f) => ({ f, t: nearest(truth, Date.parse(f.t)) }));
    it(`${id}: most windows are valid`, () => {
      expect(valid.length / flux.length).toBeGreaterThan(0.4);
    });
    it(`${id}: NCP integrated over the valid windows within 5 % of the integrated |NCP|`, () => {
      const d = pairs.reduce((a, p) => a + num(p.f, 'ncp_mmol_m2_h')! - p.t.ncp_mmol_m2_h, 0);
      const scale = pairs.reduce((a, p) => a + Math.abs(p.t.ncp_mmol_m2_h), 0);
      console.log(
        `demo vs truth: ${id} NCP integral error ${((100 * d) / scale).toFixed(1)} % over ${pairs.length} windows`,
      );
      expect(Math.abs(d) / scale).toBeLessThan(0.05);
    });
    // The inner transect's velocity is measured at the back reef, where the model's continuity (q = U h,
    // libs/simulator/README.md) gives a U for the back reef's own depth, while the budget uses the mean depth
    // of the transect: U h differs from the model's flux by the depth ratio, a bias the outer one lacks.
    const necBound = id === 'outer' ? 0.1 : 0.25;
    it(`${id}: NEC by the pCO2 + O2 inverse, integrated, within ${100 * necBound} %`, () => {
      const withNec = pairs.filter((p) => num(p.f, 'nec_mmol_m2_h') !== null);
      expect(withNec.every((p) => p.f.nec_method === 'inverse')).toBe(true);
      const d = withNec.reduce((a, p) => a + num(p.f, 'nec_mmol_m2_h')! - p.t.nec_mmol_m2_h, 0);
      const scale = withNec.reduce((a, p) => a + Math.abs(p.t.nec_mmol_m2_h), 0);
      console.log(
        `demo vs truth: ${id} NEC integral error ${((100 * d) / scale).toFixed(1)} % over ${withNec.length} windows`,
      );
      expect(Math.abs(d) / scale).toBeLessThan(necBound);
    });
  }
});
