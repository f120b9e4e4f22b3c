import { describe, expect, it } from 'vitest';
import { createRng } from '../simulator/index.js';
import { createAlertEngine } from '../alerts/index.js';
import { createQcState, qcUpdate, repeatFlag, repeatRunNeeded, stuckFlag, type QcResult } from './index.js';

const MIN = 60_000;
const T0 = Date.UTC(2026, 6, 1);
const REPEAT = { alpha: 1e-5, minRun: 4, maxRun: 12, maxRepeatP: 0.2 };

describe('repeat test: run length from the healthy repeat chance (docs/methods/faults.md 12.3)', () => {
  it('needs the shortest N >= 4 with p^(N-1) <= alpha (hand-computed)', () => {
    expect(repeatRunNeeded(0.02, REPEAT)).toBe(4); // 0.02^3 = 8e-6
    expect(repeatRunNeeded(0.03, REPEAT)).toBe(5); // 0.03^3 = 2.7e-5 > 1e-5; 0.03^4 = 8.1e-7
    expect(repeatRunNeeded(0.0001, REPEAT)).toBe(4); // never under minRun
    expect(repeatRunNeeded(0.15, REPEAT)).toBe(8); // 0.15^6 = 1.1e-5 > 1e-5; 0.15^7 = 1.7e-6
    expect(repeatRunNeeded(0.25, REPEAT)).toBeNull(); // repeats are normal: not judged
    expect(repeatRunNeeded(null, REPEAT)).toBeNull();
    expect(repeatRunNeeded(0.19, { ...REPEAT, maxRun: 6 })).toBeNull(); // would need 8
  });
  it('flags 4 at the needed length and 3 one short', () => {
    expect([1, 2, 3, 4, 5].map((n) => repeatFlag(n, 4))).toEqual([1, 1, 3, 4, 4]);
    expect(repeatFlag(3, null)).toBe(2);
  });
});

/** A day of a pCO2 sensor at 10 min (diurnal swing plus 1.5-uatm noise at 0.1 uatm), then `after`. */
function pco2Day(after: (i: number, last: number) => number, n = 24) {
  const s = createQcState('pco2_uatm');
  const rng = createRng(11);
  const out: { tMs: number; v: number; r: QcResult }[] = [];
  let last = 0;
  for (let i = 0; i < 144 + n; i++) {
    const tMs = T0 + i * 10 * MIN;
    const v =
      i < 144
        ? Math.round((420 + 60 * Math.sin((2 * Math.PI * i) / 144) + 1.5 * rng.normal()) * 10) / 10
        : after(i, last);
    last = v;
    out.push({ tMs, v, r: qcUpdate(s, tMs, v) });
  }
  return out;
}

describe('a frozen pCO2 sensor', () => {
  it('is flagged 3 at its 3rd and 4 at its 4th identical reading (30 min at 10 min), dated from the 1st', () => {
    const out = pco2Day((_, last) => last); // frozen on the last healthy reading
    const frozenFrom = out[143]!;
    // The healthy day passes.
    expect(out.slice(20, 144).every((x) => x.r.tests.flat_line === 1)).toBe(true);
    expect(out[144]!.r.tests.flat_line).toBe(1); // 2 identical: normal enough
    expect(out[145]!.r.tests.flat_line).toBe(3); // 3 identical: p^2 = 4e-4
    expect(out[146]!.r.tests.flat_line).toBe(4); // 4 identical: p^3 < 1e-5
    expect(out[146]!.r.flatSinceMs).toBe(frozenFrom.tMs);
    expect(out[146]!.tMs - frozenFrom.tMs).toBe(30 * MIN);
    // It stays frozen however long the run, until the value moves.
    expect(out.slice(147).every((x) => x.r.tests.flat_line === 4)).toBe(true);
  });

  it('raises the flatline fault alert at that reading (alert rule min_flag 4)', () => {
    const e = createAlertEngine(undefined, 'ornen-reef');
    const out = pco2Day((_, last) => last);
    const raised = out.flatMap((x) => e.observe('pco2.pco2_uatm', 'back', 'co2-back', x.tMs, x.v, x.r));
    expect(raised.map((a) => [a.rule, a.state, a.t])).toEqual([
      ['flatline', 'raised', new Date(out[146]!.tMs).toISOString()],
    ]);
  });

  it('does not learn a frozen stretch as normal: the next freeze is caught as fast', () => {
    const rng = createRng(5);
    const out = pco2Day((i, last) => {
      if (i < 144 + 20) return last; // frozen 200 min
      if (i < 144 + 40) return Math.round((420 + 1.5 * rng.normal()) * 10) / 10; // healthy again
      return i === 184 ? 431.7 : last; // frozen again
    }, 50);
    const first4 = out.findIndex((x, i) => i >= 184 && x.r.tests.flat_line === 4);
    expect(first4).toBe(187);
  });

  it('leaves a coarse, slowly varying signal to the eps/T rule (repeats are normal for it)', () => {
    // Battery-like: 0.01-V steps and 0.01-V noise repeat often. With a repeat test and no eps/T rule it stays 2.
    const s = createQcState({ variable: 'battery_v', repeat: REPEAT, spike: { suspect: 1, fail: 2 } });
    const rng = createRng(2);
    const flags = new Set<number | undefined>();
    for (let i = 0; i < 300; i++) {
      const v = Math.round((12.6 + 0.01 * rng.normal()) * 100) / 100;
      flags.add(qcUpdate(s, T0 + i * 5 * MIN, v).tests.flat_line);
    }
    expect([...flags]).toEqual([2]);
  });
});

describe('stuck at zero or a rail (docs/methods/faults.md 12.3)', () => {
  it('flags 3 on the first reading exactly at a stuck value and 4 on the second', () => {
    expect([0, 1, 2, 5].map((n) => stuckFlag(n, { values: [0], count: 2 }))).toEqual([1, 3, 4, 4]);
    const s = createQcState('sal');
    expect(qcUpdate(s, T0, 35.1).tests.stuck).toBe(1);
    expect(qcUpdate(s, T0 + 5 * MIN, 0).tests.stuck).toBe(3); // a conductivity cell out of the water
    const r = qcUpdate(s, T0 + 10 * MIN, 0);
    expect(r.tests.stuck).toBe(4);
    expect(r.flag).toBe(4);
    expect(qcUpdate(s, T0 + 15 * MIN, 35.1).tests.stuck).toBe(1);
    const p = createQcState('pco2_uatm');
    qcUpdate(p, T0, 3000); // the top of a 0-3000 uatm range: the detector is saturated
    expect(qcUpdate(p, T0 + 10 * MIN, 3000).tests.stuck).toBe(4);
  });

  it('raises a range fault alert whose limit is the stuck value', () => {
    const e = createAlertEngine(undefined, 'ornen-reef');
    const s = createQcState('sal');
    const recs = [35.1, 35.1, 0, 0, 0].flatMap((v, i) =>
      e.observe('ctd.sal', 'flat', 'ctd-flat', T0 + i * 5 * MIN, v, qcUpdate(s, T0 + i * 5 * MIN, v)),
    );
    expect(recs).toHaveLength(1);
    expect(recs[0]).toMatchObject({ rule: 'range', fault: 'range', state: 'raised', value: 0, limit: 0 });
    expect(recs[0]!.t).toBe(new Date(T0 + 15 * MIN).toISOString());
  });

  it('does not call a calm wind stuck (wind: only the 60-m/s rail)', () => {
    const s = createQcState('wind_m_s');
    for (let i = 0; i < 5; i++) expect(qcUpdate(s, T0 + i * 5 * MIN, 0).tests.stuck).toBe(1);
  });
});
