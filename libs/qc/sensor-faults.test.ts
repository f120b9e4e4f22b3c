import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  activeFaults,
  createFaultState,
  DEFAULT_FAULT_OPTIONS as OPTS,
  faultsAdvance,
  faultsExternal,
  faultsOnBattery,
  faultsOnMessage,
  faultsOnQc,
  faultsRestore,
  invalidReasons,
  type FaultState,
  type QcOutcome,
} from './index.js';

const MIN = 60_000;
const T0 = Date.UTC(2026, 6, 1);
const at = (m: number) => T0 + m * MIN;
const ok: QcOutcome = { flag: 1, tests: { gross_range: 1, flat_line: 1, spike: 2 } };
const KEY = 'back/co2-back';

/** Messages and QC of one pCO2 sensor every 10 min; `qc(i)` gives the outcome of sample i. */
function feed(st: FaultState, from: number, to: number, qc: (i: number) => QcOutcome, key = KEY) {
  const changes = [];
  for (let i = from; i < to; i++) {
    changes.push(...faultsOnMessage(st, OPTS, key, 'pco2', at(10 * i)));
    changes.push(...faultsOnQc(st, OPTS, key, 'pco2', 'pco2_uatm', at(10 * i), qc(i)));
    changes.push(...faultsAdvance(st, OPTS, at(10 * i)));
  }
  return changes;
}

describe('sensor-fault state (docs/methods/faults.md 12.7)', () => {
  it('dates a flat line from its first frozen reading and re-enters after 3 passing samples', () => {
    const st = createFaultState();
    const frozen = (i: number): QcOutcome =>
      i >= 13 && i < 20 ? { flag: 4, tests: { gross_range: 1, flat_line: 4 }, flatSinceMs: at(100) } : ok;
    const ch = feed(st, 0, 30, frozen);
    expect(ch.map((c) => [c.fault, c.change, (c.atMs - T0) / MIN, (c.sinceMs - T0) / MIN])).toEqual([
      ['flatline', 'opened', 130, 100],
      ['flatline', 'ended', 200, 100],
      ['flatline', 'cleared', 220, 100], // samples at 200, 210, 220 pass
    ]);
    // Asked after detection, the fault covers the readings before it too (the windows still open then).
    expect(activeFaults(st, KEY, at(100)).map((e) => e.fault)).toEqual(['flatline']);
    expect(activeFaults(st, KEY, at(99))).toEqual([]);
    expect(activeFaults(st, KEY, at(215))).toHaveLength(1); // recovering: still not trusted
    expect(activeFaults(st, KEY, at(220))).toEqual([]);
    expect(invalidReasons(st, [KEY, 'back/o2-back'], at(50), at(110))).toEqual([
      'input_fault:back/co2-back/flatline',
    ]);
    expect(invalidReasons(st, [KEY], at(221), at(290))).toEqual([]);
  });

  it('a failed sample while recovering starts the count again; the fault coming back reopens the episode', () => {
    const st = createFaultState();
    const flagAt: Record<number, QcOutcome> = {
      3: { flag: 4, tests: { gross_range: 4 } },
      4: ok, // ends, pass 1
      5: { flag: 4, tests: { gross_range: 1, flat_line: 1, rate_of_change: 3, timing: 4 } }, // failed: 0
      6: ok,
      7: ok,
      8: { flag: 4, tests: { gross_range: 4 } }, // back before re-entry: same episode
      9: ok,
      10: ok,
      11: ok,
    };
    const ch = feed(st, 0, 14, (i) => flagAt[i] ?? ok);
    expect(ch.map((c) => [c.fault, c.change, (c.atMs - T0) / MIN])).toEqual([
      ['range', 'opened', 30],
      ['range', 'ended', 40],
      ['range', 'ended', 90],
      ['range', 'cleared', 110],
    ]);
  });

  it('makes the sensor faulty at the 3rd spike in an hour, from the first', () => {
    const st = createFaultState();
    const spikeAt = new Set([4, 6, 8]); // samples 3, 5, 7 fail their spike test, known one sample late
    const ch = feed(st, 0, 30, (i) =>
      spikeAt.has(i)
        ? {
            flag: 1,
            tests: { gross_range: 1 },
            finalizedPrevious: { tMs: at(10 * (i - 1)), flag: 4, tests: { spike: 4 } },
          }
        : {
            flag: 1,
            tests: { gross_range: 1 },
            finalizedPrevious: { tMs: at(10 * (i - 1)), flag: 1, tests: { spike: 1 } },
          },
    );
    expect(ch.map((c) => [c.fault, c.change, (c.atMs - T0) / MIN, (c.sinceMs - T0) / MIN])).toEqual([
      ['spike', 'opened', 80, 30],
      ['spike', 'ended', 130, 30], // the window holds none of them after 70 + 60 min
      ['spike', 'cleared', 150, 30], // judged on the finalized samples 120, 130, 140
    ]);
  });

  it('goes stale at 3 x the usual interval, dated from the first missed message; bottle samples never', () => {
    const st = createFaultState();
    feed(st, 0, 10, () => ok); // 10-min cadence, last message at 90
    faultsOnMessage(st, OPTS, 'back/bottle', 'sample', at(0));
    faultsOnMessage(st, OPTS, 'back/bottle', 'sample', at(60)); // a 1-h campaign, then weeks of nothing
    expect(faultsAdvance(st, OPTS, at(120))).toEqual([]); // exactly at the limit: not yet
    const ch = faultsAdvance(st, OPTS, at(10_000));
    expect(ch).toEqual([{ key: KEY, fault: 'stale', change: 'opened', atMs: at(120), sinceMs: at(100) }]);
    // Back: recovering, and trusted again after 3 samples that pass.
    const back = feed(st, 1000, 1004, () => ok);
    expect(back.map((c) => [c.change, (c.atMs - T0) / MIN])).toEqual([
      ['ended', 10_000],
      ['cleared', 10_020],
    ]);
    // The outage did not teach the cadence: the next silence is judged on 10 min again.
    expect(faultsAdvance(st, OPTS, at(10_030 + 30.001)).map((c) => c.fault)).toEqual(['stale']);
  });

  it('a recovering sensor that falls silent again is stale again (same episode, not yet re-entered)', () => {
    const st = createFaultState();
    feed(st, 0, 10, () => ok);
    faultsAdvance(st, OPTS, at(500));
    // One message back, its sample failed: still recovering; then silence again.
    faultsOnMessage(st, OPTS, KEY, 'pco2', at(500));
    faultsOnQc(st, OPTS, KEY, 'pco2', 'pco2_uatm', at(500), { flag: 4, tests: { gross_range: 4 } });
    expect(activeFaults(st, KEY, at(500)).find((e) => e.fault === 'stale')?.endMs).toBe(at(500));
    faultsAdvance(st, OPTS, at(600));
    expect(activeFaults(st, KEY, at(600)).find((e) => e.fault === 'stale')?.endMs).toBeNull();
  });

  it('stale checks come out of the heap in deadline order for many sensors, like a full scan (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: 9 }), fc.integer({ min: 1, max: 30 })), {
          minLength: 5,
          maxLength: 200,
        }),
        (events) => {
          const st = createFaultState();
          const last = new Map<string, number[]>();
          let t = T0;
          for (const [s, dtMin] of events) {
            t += dtMin * 20_000;
            const key = `st/s${s}`;
            faultsOnMessage(st, OPTS, key, 'ctd', t);
            last.set(key, [...(last.get(key) ?? []), t]);
            faultsAdvance(st, OPTS, t);
          }
          const end = t + 24 * 60 * MIN;
          const got = faultsAdvance(st, OPTS, end).map((c) => c.key);
          // Full scan: every sensor with an interval is stale at the end; the heap opens them in deadline order.
          const want = [...last]
            .filter(([, ts]) => ts.length >= 2)
            .filter(([k]) => !st.sensors[k]!.episodes.some((e) => e.fault === 'stale' && e.detectedMs < t))
            .map(([k]) => k);
          expect([...got].sort()).toEqual([...want].sort());
          const ats = faultsAdvance(st, OPTS, end + 1);
          expect(ats).toEqual([]);
        },
      ),
      { numRuns: 100 },
    );
  });

  it('battery warns without invalidating; logbook exclusions invalidate their span and re-enter at its end', () => {
    const st = createFaultState();
    faultsOnBattery(st, OPTS, KEY, 'pco2', at(0), 11.4, 11.5);
    expect(activeFaults(st, KEY, at(0)).map((e) => e.fault)).toEqual(['battery']);
    expect(invalidReasons(st, [KEY], at(0), at(10))).toEqual([]);
    faultsExternal(st, KEY, 'pco2', 'logbook_exclusion', at(30), at(60), 'membrane cleaned');
    expect(invalidReasons(st, [KEY], at(20), at(30))).toEqual([
      'input_fault:back/co2-back/logbook_exclusion',
    ]);
    expect(invalidReasons(st, [KEY], at(60), at(90))).toEqual([]);
    for (let i = 1; i <= 3; i++) faultsOnBattery(st, OPTS, KEY, 'pco2', at(i), 12.5, 11.5);
    expect(activeFaults(st, KEY, at(3)).map((e) => e.fault)).toEqual([]);
  });

  it('forgets cleared episodes after retainMs and resumes exactly after a JSON round trip', () => {
    const mk = () => createFaultState();
    const script = (st: FaultState, cut?: number): FaultState => {
      let s = st;
      for (let i = 0; i < 400; i++) {
        if (i === cut) s = faultsRestore(JSON.parse(JSON.stringify(s)) as FaultState, OPTS);
        const silent = i > 100 && i < 110;
        if (silent) continue;
        faultsOnMessage(s, OPTS, KEY, 'pco2', at(10 * i));
        faultsOnQc(
          s,
          OPTS,
          KEY,
          'pco2',
          'pco2_uatm',
          at(10 * i),
          i % 50 === 7 ? { flag: 4, tests: { gross_range: 4 } } : ok,
        );
        faultsAdvance(s, OPTS, at(10 * i));
      }
      return s;
    };
    const whole = script(mk());
    for (const cut of [50, 105, 300]) expect(script(mk(), cut).sensors).toEqual(whole.sensors);
    // 400 samples = 66 h: the episodes cleared before 66 - 48 = 18 h are gone.
    const eps = whole.sensors[KEY]!.episodes;
    expect(eps.every((e) => e.clearedMs === null || e.clearedMs > at(3990) - OPTS.retainMs)).toBe(true);
    expect(eps.length).toBeGreaterThan(0);
    expect(eps.some((e) => e.sinceMs === at(70))).toBe(false);
  });
});
