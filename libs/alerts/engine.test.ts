import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { createAlertEngine, type AlertRecord } from './index.js';

const MIN = 60_000;
const T0 = Date.UTC(2026, 2, 10, 0, 0, 0);
const at = (min: number): string => new Date(T0 + min * MIN).toISOString();

/** Feeds `values` at one sample per `stepMin` from minute `fromMin`; returns every record. */
function feed(
  e: ReturnType<typeof createAlertEngine>,
  metric: string,
  values: number[],
  opts: { station?: string; sensor?: string; fromMin?: number; stepMin?: number; flag?: number } = {},
): AlertRecord[] {
  const out: AlertRecord[] = [];
  values.forEach((v, i) => {
    const t = T0 + ((opts.fromMin ?? 0) + i * (opts.stepMin ?? 1)) * MIN;
    out.push(...e.observe(metric, opts.station ?? 'crest', opts.sensor, t, v, opts.flag ?? 1));
  });
  return out;
}
const rep = (v: number, n: number): number[] => Array.from({ length: n }, () => v);

describe('built-in low oxygen rule (contract: o2_mg_l below 2.0 for 10 min, cleared above 2.5)', () => {
  it('raises after 10 min below 2.0, holds in the dead band, clears above 2.5', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    // minutes 0-4 at 3.0, minutes 5-19 at 1.9 -> raise at minute 15 (10 min after the first breach at minute 5).
    const a = feed(e, 'oxygen.o2_mg_l', [...rep(3.0, 5), ...rep(1.9, 15)]);
    expect(a).toEqual([
      {
        type: 'alert',
        site: 'demo-reef',
        t: at(15),
        station: 'crest',
        rule: 'low_oxygen',
        class: 'threshold',
        state: 'raised',
        value: 1.9,
        limit: 2.0,
        metric: 'oxygen.o2_mg_l',
        id: expect.stringMatching(/^[0-9a-f]{8}$/),
        severity: 'critical',
      },
    ]);
    // 2.3 and exactly 2.5 are inside the hysteresis band: still raised.
    expect(feed(e, 'oxygen.o2_mg_l', [...rep(2.3, 10), 2.5], { fromMin: 20 })).toEqual([]);
    const c = feed(e, 'oxygen.o2_mg_l', [2.51], { fromMin: 31 });
    expect(c).toHaveLength(1);
    expect(c[0]).toMatchObject({
      state: 'cleared',
      t: at(31),
      value: 2.51,
      limit: 2.5,
      id: a[0]!.id,
      raised_t: at(15),
    });
  });

  it('needs the breach on every sample for the whole 10 min', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    expect(feed(e, 'oxygen.o2_mg_l', [...rep(1.9, 6), 2.05, ...rep(1.9, 10)])).toEqual([]);
    // The 11th consecutive breaching sample (10 min after the run began at minute 7) raises.
    expect(feed(e, 'oxygen.o2_mg_l', [1.9], { fromMin: 17 })).toMatchObject([{ state: 'raised', t: at(17) }]);
  });

  it('ignores values flagged 4 or 9 and restarts a pending raise after a data gap', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    expect(feed(e, 'oxygen.o2_mg_l', rep(0.5, 30), { flag: 4 })).toEqual([]);
    // 1.8 at minute 0, then nothing for 40 min (> max_gap_min 30), then 1.8 from minute 40: raise at minute 50.
    const e2 = createAlertEngine(undefined, 'demo-reef');
    expect(feed(e2, 'oxygen.o2_mg_l', [1.8])).toEqual([]);
    expect(feed(e2, 'oxygen.o2_mg_l', rep(1.8, 10), { fromMin: 40 })).toEqual([]);
    expect(feed(e2, 'oxygen.o2_mg_l', [1.8], { fromMin: 50 })).toMatchObject([{ state: 'raised' }]);
  });
});

describe('built-in low aragonite saturation rule (contract: omega_ar below 3.0, 30 min)', () => {
  it('raises after 30 min, clears above 3.2 by default, or at a configured clear limit', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    const r = feed(e, 'carbonate.omega_ar', [3.4, 2.9, 2.8, 2.7, 2.9, 3.1, 3.15, 3.25], { stepMin: 10 });
    expect(r.map((x) => [x.state, x.t, x.limit])).toEqual([
      ['raised', at(40), 3.0], // first breach at minute 10, 30 min later
      ['cleared', at(70), 3.2],
    ]);
    const e2 = createAlertEngine({ low_omega_ar: { clear: 3.05 } }, 'demo-reef');
    const r2 = feed(e2, 'carbonate.omega_ar', [2.9, 2.9, 2.9, 2.9, 3.1], { stepMin: 10 });
    expect(r2.map((x) => x.state)).toEqual(['raised', 'cleared']);
  });
});

describe('no flapping on a noisy series hovering at a limit', () => {
  // mulberry32 (common practice), seeded: a deterministic noise source.
  const rng = (seed: number) => () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  it('one day of 1-min O2 at 2.0 +- 0.3 mg/L: hundreds of limit crossings, at most one raise, no clear', () => {
    const r = rng(7);
    const xs = Array.from({ length: 1440 }, () => 2.0 + 0.6 * (r() - 0.5));
    let crossings = 0;
    for (let i = 1; i < xs.length; i++) if (xs[i - 1]! < 2.0 !== xs[i]! < 2.0) crossings++;
    expect(crossings).toBeGreaterThan(300);
    const out = feed(createAlertEngine(undefined, 'demo-reef'), 'oxygen.o2_mg_l', xs);
    expect(out.filter((x) => x.state === 'raised').length).toBeLessThanOrEqual(1);
    expect(out.filter((x) => x.state === 'cleared')).toEqual([]);
  });
  it('a raised alert hovering at its clear limit (2.5 +- 0.3) clears exactly once and does not re-raise', () => {
    const e = createAlertEngine(undefined, 'demo-reef');
    expect(feed(e, 'oxygen.o2_mg_l', rep(1.5, 11))).toHaveLength(1);
    const r = rng(11);
    const out = feed(
      e,
      'oxygen.o2_mg_l',
      Array.from({ length: 1440 }, () => 2.5 + 0.6 * (r() - 0.5)),
      { fromMin: 11 },
    );
    expect(out.map((x) => x.state)).toEqual(['cleared']);
  });
  it('property: raises and clears alternate per series and each raise follows raise_after of breaches', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 1, max: 3.5, noNaN: true }), { maxLength: 200 }), (xs) => {
        const out = feed(createAlertEngine(undefined, 'demo-reef'), 'oxygen.o2_mg_l', xs);
        out.forEach((x, i) => expect(x.state).toBe(i % 2 === 0 ? 'raised' : 'cleared'));
        for (const x of out.filter((y) => y.state === 'raised')) {
          const k = (Date.parse(x.t) - T0) / MIN;
          for (let j = k - 10; j <= k; j++) expect(xs[j]!).toBeLessThan(2.0);
        }
      }),
    );
  });
});

describe('user rules', () => {
  it('above a limit with hysteresis and durations to raise and to clear, per-station scope', () => {
    const e = createAlertEngine(
      {
        rules: {
          warm_water: {
            metric: 'ctd.temp_c',
            above: 31,
            clear: 30.5,
            raise_after_min: 20,
            clear_after_min: 20,
            stations: ['crest'],
            severity: 'info',
          },
        },
      },
      'demo-reef',
    );
    const xs = [30, 31.2, 31.4, 31.3, 30.8, 30.4, 30.2, 30.6, 30.3, 30.2, 30.1];
    expect(feed(e, 'ctd.temp_c', xs, { station: 'back', stepMin: 10 })).toEqual([]); // out of scope
    const out = feed(e, 'ctd.temp_c', xs, { stepMin: 10 });
    // raise: above 31 at 10, 20, 30 -> 20 min after minute 10. Clear: below 30.5 at 50, 60, then 30.6 at 70
    // resets; below again from 80: 20 min later at 100.
    expect(out.map((x) => [x.rule, x.state, x.t, x.limit, x.severity])).toEqual([
      ['warm_water', 'raised', at(30), 31, 'info'],
      ['warm_water', 'cleared', at(100), 30.5, 'info'],
    ]);
  });
  it('site-wide scope keeps one series per station', () => {
    const e = createAlertEngine(
      { rules: { low_sal: { metric: 'ctd.sal', below: 30, clear: 31 } } },
      'demo-reef',
    );
    const a = feed(e, 'ctd.sal', [29.5], { station: 'crest' });
    const b = feed(e, 'ctd.sal', [29.5], { station: 'back' });
    expect([...a, ...b].map((x) => x.station)).toEqual(['crest', 'back']);
    expect(a[0]!.id).not.toBe(b[0]!.id);
  });
  it('ignore_suspect skips values flagged 3', () => {
    const e = createAlertEngine(
      { rules: { low_sal: { metric: 'ctd.sal', below: 30, ignore_suspect: true } } },
      'demo-reef',
    );
    expect(feed(e, 'ctd.sal', [29.5], { flag: 3 })).toEqual([]);
    expect(feed(e, 'ctd.sal', [29.5], { flag: 1, fromMin: 1 })).toHaveLength(1);
  });
});
