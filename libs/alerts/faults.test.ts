import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { createQcState, qcUpdate, DEFAULT_QC_LIMITS } from '../qc/index.js';
import { createAlertEngine, type AlertRecord, type EngineSnapshot } from './index.js';

const MIN = 60_000;
const T0 = Date.UTC(2026, 2, 10);
const at = (ms: number): string => new Date(ms).toISOString();

describe('stale (contract: no message for 3 x the usual interval, at least 5 min), on event time', () => {
  it('uses the 5-min floor for a 1-min sensor and raises at last + limit whatever the watermark cadence', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    for (let i = 0; i < 20; i++) e.observe('ctd.temp_c', 'crest', 'ctd', T0 + i * MIN, 27, 1);
    const last = T0 + 19 * MIN;
    expect(e.advance(last + 5 * MIN)).toEqual([]); // exactly at the limit: not yet
    const r = e.advance(last + 47 * MIN);
    expect(r).toEqual([
      {
        type: 'alert',
        site: 'demo-reef',
        t: at(last + 5 * MIN),
        station: 'crest',
        rule: 'stale',
        class: 'fault',
        state: 'raised',
        value: 300,
        limit: 300,
        fault: 'stale',
        sensor: 'ctd',
        id: expect.stringMatching(/^[0-9a-f]{8}$/),
        severity: 'warning',
      },
    ]);
    expect(e.advance(last + 60 * MIN)).toEqual([]); // no second raise
    const c = e.observe('ctd.temp_c', 'crest', 'ctd', last + 62 * MIN, 27, 1);
    expect(c).toMatchObject([
      { state: 'cleared', value: 3720, limit: 300, id: r[0]!.id, t: at(last + 62 * MIN) },
    ]);
  });

  it('uses 3 x the observed interval above the floor, robust to one odd interval', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const times = [0, 10, 20, 30, 31, 40, 50, 60].map((m) => T0 + m * MIN); // median interval 10 min
    for (const t of times) e.observe('pco2.pco2_uatm', 'back', 'co2', t, 400, 1);
    expect(e.advance(T0 + 89 * MIN)).toEqual([]);
    expect(e.advance(T0 + 91 * MIN)).toMatchObject([{ t: at(T0 + 90 * MIN), limit: 1800 }]);
  });

  it('ignores sample times that failed the timing test (a clock running ahead)', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const qc = createQcState('temp_c');
    for (let i = 0; i < 5; i++) {
      const t = T0 + i * MIN;
      e.observe('ctd.temp_c', 'crest', 'ctd', t, 27, qcUpdate(qc, t, 27, t));
    }
    const ahead = T0 + 5 * MIN + 3_600_000; // stamped an hour ahead of its receipt
    e.observe('ctd.temp_c', 'crest', 'ctd', ahead, 27, qcUpdate(qc, ahead, 27, T0 + 5 * MIN));
    expect(e.advance(T0 + 20 * MIN)).toMatchObject([{ rule: 'stale', t: at(T0 + 9 * MIN) }]);
  });

  it('ten sensors going silent at once give ten records from one advance, in a stable order', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    for (let s = 9; s >= 0; s--)
      for (let i = 0; i < 5; i++) e.observe('ctd.sal', 'crest', `c${s}`, T0 + i * MIN, 35, 1);
    const r = e.advance(T0 + 30 * MIN);
    expect(r.map((x) => x.sensor)).toEqual(['c0', 'c1', 'c2', 'c3', 'c4', 'c5', 'c6', 'c7', 'c8', 'c9']);
    expect(e.active()).toHaveLength(10);
  });
});

describe('faults from the QC tests of libs/qc', () => {
  it('range: a gross-range fail raises with the violated sensor limit; 10 min of valid values clear', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const qc = createQcState('temp_c');
    const lim = DEFAULT_QC_LIMITS.temp_c!.sensor;
    const out: AlertRecord[] = [];
    const xs = [27, 45, 46, 27, 27.1, 27, 27.2, 27.1];
    xs.forEach((v, i) => {
      const t = T0 + i * 5 * MIN;
      out.push(...e.observe('ctd.temp_c', 'crest', 'ctd', t, v, { ...qcUpdate(qc, t, v), limits: lim }));
    });
    expect(out.map((x) => [x.rule, x.state, x.t, x.value, x.limit, x.metric])).toEqual([
      ['range', 'raised', at(T0 + 5 * MIN), 45, 40, 'ctd.temp_c'],
      ['range', 'cleared', at(T0 + 25 * MIN), 27, 40, 'ctd.temp_c'], // ok since minute 15, + 10 min
    ]);
  });

  it('range: without limits passed in, the record reports the libs/qc default sensor limit', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const qc = createQcState('sal');
    const r = e.observe('ctd.sal', 'crest', 'ctd', T0, -1, qcUpdate(qc, T0, -1));
    expect(r).toMatchObject([{ rule: 'range', state: 'raised', value: -1, limit: 0 }]); // sal sensor min 0 (7.3)
    const t1 = T0 + 20 * MIN;
    e.observe('ctd.sal', 'crest', 'ctd', T0 + 5 * MIN, 35, qcUpdate(qc, T0 + 5 * MIN, 35));
    const c = e.observe('ctd.sal', 'crest', 'ctd', t1, 35, qcUpdate(qc, t1, 35));
    expect(c).toMatchObject([{ rule: 'range', state: 'cleared', limit: 0 }]); // the limit that was violated
  });

  it('flatline: raised when the flat-line test fails (4 h for temperature), cleared when the value moves', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const qc = createQcState('temp_c');
    const out: AlertRecord[] = [];
    for (let m = 0; m <= 300; m += 10) {
      const v = m < 290 ? 26.5 : 26.7;
      out.push(...e.observe('ctd.temp_c', 'crest', 'ctd', T0 + m * MIN, v, qcUpdate(qc, T0 + m * MIN, v)));
    }
    expect(out.map((x) => [x.rule, x.state, x.t])).toEqual([
      ['flatline', 'raised', at(T0 + 240 * MIN)],
      ['flatline', 'cleared', at(T0 + 290 * MIN)],
    ]);
  });

  it('spike: three final spike flags within an hour raise; an hour without one clears', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const qc = createQcState({ variable: 'temp_c', flatLine: { eps: 0, suspectMs: 1e12, failMs: 1e12 } });
    const xs = [27, 27, 28.5, 27, 27, 28.5, 27, 27, 28.5, 27, ...Array.from({ length: 14 }, () => 27)];
    const out: AlertRecord[] = [];
    xs.forEach((v, i) =>
      out.push(
        ...e.observe('ctd.temp_c', 'crest', 'ctd', T0 + i * 5 * MIN, v, qcUpdate(qc, T0 + i * 5 * MIN, v)),
      ),
    );
    // Spikes at minutes 10, 25, 40; the third is final when minute 45 arrives. Clear when the window
    // (t - 60 min, t] no longer holds a spike: minute 100.
    expect(out.map((x) => [x.rule, x.state, x.t, x.value])).toEqual([
      ['spike', 'raised', at(T0 + 45 * MIN), 3],
      ['spike', 'cleared', at(T0 + 100 * MIN), 0],
    ]);
  });

  it('battery: per-kind default and configured thresholds, with a clear margin', () => {
    const e = createAlertEngine({ faults: { battery: { below_v: { oxygen: 11.0 } } } }, 'demo-reef');
    const run = (metric: string, sensor: string, xs: number[], from: number): AlertRecord[] =>
      xs.flatMap((v, i) => e.observe(metric, 'crest', sensor, T0 + (from + i) * 5 * MIN, v, 1));
    // ctd default 10.5 V: 10.2 from minute 0, raised at minute 10; 10.7 is inside the 0.3 V margin; 10.9 clears.
    expect(
      run('ctd.battery_v', 'ctd', [10.2, 10.2, 10.2, 10.7, 10.9], 0).map((x) => [x.state, x.limit, x.fault]),
    ).toEqual([
      ['raised', 10.5, 'battery'],
      ['cleared', 10.8, 'battery'],
    ]);
    expect(run('oxygen.battery_v', 'o2', [10.8, 10.8, 10.8], 0).map((x) => [x.state, x.limit])).toEqual([
      ['raised', 11.0],
    ]);
  });
});

describe('snapshot / restore', () => {
  it('survives a restart mid-episode through JSON: no second raise, and the clear still comes', () => {
    const e1 = createAlertEngine(undefined, 'demo-reef');
    const raised: AlertRecord[] = [];
    for (let i = 0; i < 15; i++)
      raised.push(...e1.observe('oxygen.o2_mg_l', 'crest', 'o2', T0 + i * MIN, 1.7, 1));
    for (let i = 0; i < 5; i++)
      e1.observe('carbonate.omega_ar', 'crest', undefined, T0 + i * 5 * MIN, 2.8, 1);
    expect(raised).toHaveLength(1);
    const json = JSON.stringify(e1.snapshot());

    const e2 = createAlertEngine(undefined, 'demo-reef');
    e2.restore(JSON.parse(json) as EngineSnapshot);
    expect(e2.active().map((x) => x.id)).toEqual([raised[0]!.id]);
    const after: AlertRecord[] = [];
    for (let i = 15; i < 30; i++)
      after.push(...e2.observe('oxygen.o2_mg_l', 'crest', 'o2', T0 + i * MIN, 1.7, 1));
    expect(after).toEqual([]); // no re-raise
    // The omega_ar pending raise (breaching since minute 0) carried over: raised at minute 30, not 50.
    const om = e2.observe('carbonate.omega_ar', 'crest', undefined, T0 + 30 * MIN, 2.8, 1);
    expect(om).toMatchObject([{ rule: 'low_omega_ar', state: 'raised', t: at(T0 + 30 * MIN) }]);
    const c = e2.observe('oxygen.o2_mg_l', 'crest', 'o2', T0 + 31 * MIN, 2.7, 1);
    expect(c).toMatchObject([{ state: 'cleared', id: raised[0]!.id }]);
  });

  it('a stale episode survives a restart and clears on the next message', () => {
    const e1 = createAlertEngine(undefined, 'demo-reef');
    for (let i = 0; i < 5; i++) e1.observe('par.par_umol_m2_s', 'crest', 'par', T0 + i * MIN, 500, 1);
    const r = e1.advance(T0 + 60 * MIN);
    const e2 = createAlertEngine(undefined, 'demo-reef');
    e2.restore(JSON.parse(JSON.stringify(e1.snapshot())) as EngineSnapshot);
    expect(e2.advance(T0 + 90 * MIN)).toEqual([]);
    expect(e2.observe('par.par_umol_m2_s', 'crest', 'par', T0 + 95 * MIN, 480, 1)).toMatchObject([
      { state: 'cleared', id: r[0]!.id },
    ]);
  });

  it('property: a JSON snapshot/restore at any point gives the same records as an uninterrupted run', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 1, max: 4, noNaN: true }), fc.integer({ min: 1, max: 20 })), {
          minLength: 1,
          maxLength: 150,
        }),
        fc.nat(),
        (steps, cut) => {
          const k = cut % steps.length;
          const run = (restartAt: number | null): AlertRecord[] => {
            let e = createAlertEngine(
              { rules: { hi: { metric: 'oxygen.o2_mg_l', above: 3.5, clear: 3.2, raise_after_min: 5 } } },
              'demo-reef',
            );
            const qc = createQcState('o2_mg_l');
            const out: AlertRecord[] = [];
            let t = T0;
            steps.forEach(([v, dtMin], i) => {
              if (i === restartAt) {
                const snap = JSON.parse(JSON.stringify(e.snapshot())) as EngineSnapshot;
                e = createAlertEngine(
                  { rules: { hi: { metric: 'oxygen.o2_mg_l', above: 3.5, clear: 3.2, raise_after_min: 5 } } },
                  'demo-reef',
                );
                e.restore(snap);
              }
              t += dtMin * MIN;
              out.push(...e.observe('oxygen.o2_mg_l', 'crest', 'o2', t, v, qcUpdate(qc, t, v)));
              if (i % 5 === 4) out.push(...e.advance(t + 3 * MIN));
            });
            return out;
          };
          expect(run(k)).toEqual(run(null));
        },
      ),
      { numRuns: 150 },
    );
  });

  it('refuses a snapshot of another site', () => {
    const s = createAlertEngine(undefined, 'a').snapshot();
    expect(() => createAlertEngine(undefined, 'b').restore(s)).toThrow(/REEFD_ALERTS_BAD_SNAPSHOT/);
  });
});

describe('bottle samples are never stale (docs/methods/faults.md 12.5)', () => {
  it('a sampling campaign then weeks of nothing raises nothing, while a CTD on the same station does', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    for (let i = 0; i < 6; i++) {
      e.observe('sample.received', 'back', 'bottle', T0 + i * 10 * MIN, 1, 1);
      e.observe('ctd.temp_c', 'back', 'ctd', T0 + i * 10 * MIN, 27, 1);
    }
    const r = e.advance(T0 + 30 * 24 * 60 * MIN);
    expect(r.map((a) => [a.rule, a.sensor])).toEqual([['stale', 'ctd']]);
  });
});

describe('stale from the deadline heap', () => {
  it('raises in deadline order (then by station and sensor), whatever order the sensors were first seen', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    // z at 5 min, a at 5 min, m at 10 min: deadlines last + 15 min, last + 15 min, last + 30 min.
    for (let i = 0; i < 10; i++) {
      e.observe('ctd.temp_c', 'st', 'z', T0 + i * 5 * MIN, 27, 1);
      e.observe('ctd.temp_c', 'st', 'a', T0 + i * 5 * MIN + 1000, 27, 1);
      if (i % 2 === 0) e.observe('pco2.pco2_uatm', 'st', 'm', T0 + i * 5 * MIN, 400, 1);
    }
    const r = e.advance(T0 + 10 * 60 * MIN);
    expect(r.map((a) => a.sensor)).toEqual(['z', 'a', 'm']);
    expect(r.map((a) => a.t)).toEqual([at(T0 + 60 * MIN), at(T0 + 60 * MIN + 1000), at(T0 + 70 * MIN)]);
  });
});
