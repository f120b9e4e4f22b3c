// Fault propagation through the processor (docs/methods/faults.md 12.7; docs/contract-v1.md, E3 validity), on
// the synthetic deployment of test-helpers.ts: each scripted fault reaches the records built from the faulty
// sensor and no flux window over it is valid, flag-3 inputs stay flag 3, a sensor re-enters only after its QC
// passes again, and the state survives a checkpoint.
import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../contract/index.js';
import { recordToLine } from '../lineproto/index.js';
import { exclusionsOf } from './faults.js';
import type { ProcessorState } from './state.js';
import {
  deploymentMessages,
  fluxes,
  HOUR,
  MIN,
  runDeployment,
  startDeployment,
  T0,
  type Script,
} from './test-helpers.js';

const W = 30 * MIN; // window_min default
const HOURS = 12;

/** Flux windows: [start, end) from the record's centre time. */
const span = (f: DerivedRecord): [number, number] => [Date.parse(f.t) - W / 2, Date.parse(f.t) + W / 2];
const reasons = (r: DerivedRecord): string[] => {
  const s = (r as { invalid_reasons?: string }).invalid_reasons;
  return s ? s.split(',') : [];
};
const flagOf = (r: DerivedRecord): number => (r as { flag?: number }).flag ?? 1;

function run(script: Script) {
  const messages = deploymentMessages(HOURS, script);
  return { messages, ...runDeployment(messages) };
}

describe('clean data', () => {
  const { records } = run({});
  it('gives valid windows with no fault reasons after the first two (no storage before them)', () => {
    const f = fluxes(records);
    expect(f.length).toBe(69);
    for (const r of f) {
      expect(r.valid, r.t).toBe(true);
      expect(
        reasons(r).some((x) => x.startsWith('input_')),
        r.t,
      ).toBe(false);
    }
    // flag 3 only where the inverse had no previous solution (its steady form, docs/methods/metabolism.md 6.5)
    expect(f.filter((r) => flagOf(r) === 3).every((r) => String(r.notes).includes('steady_form'))).toBe(true);
  });
  it('raises no fault alert and no record names a fault', () => {
    expect(records.filter((r) => r.type === 'alert')).toEqual([]);
    // (A daily record's invalid_reasons are the budget's own, docs/methods/daily.md 10.4: not faults.)
    expect(records.filter((r) => reasons(r).length > 0 && r.type !== 'flux' && r.type !== 'daily')).toEqual(
      [],
    );
  });
});

describe('a frozen pCO2 sensor (repeats its last reading bit for bit)', () => {
  const from = T0 + 6 * HOUR;
  const to = T0 + 9 * HOUR;
  const { records, messages } = run({ freezeBackPco2: [from, to] });
  // The reading at `from` is the last true one; the sensor repeats it from the next reading on.
  const frozen = messages.filter(
    (m) => m.sensor === 'co2' && m.station === 'back' && m.tMs > from && m.tMs < to,
  );

  it('is alerted within 60 min of its first frozen reading', () => {
    const a = records.find((r) => r.type === 'alert' && r.rule === 'flatline' && r.state === 'raised');
    expect(a?.sensor).toBe('co2');
    // Repeat test (docs/methods/faults.md 12.3): this sensor's noise (1.5 uatm at 0.1 uatm) repeats a reading
    // about 3 % of the time, so 5 identical readings flag 4: the 4th frozen one, 30 min after the first.
    expect(Date.parse(a!.t) - frozen[0]!.tMs).toBe(30 * MIN);
  });

  it('makes every window that read a frozen reading invalid, naming the sensor and the fault', () => {
    const hit = fluxes(records).filter((f) => {
      const [s, e] = span(f);
      return frozen.some((m) => m.tMs >= s - W && m.tMs < e); // the storage term reads the previous window
    });
    expect(hit.length).toBeGreaterThanOrEqual(18 + 3);
    for (const f of hit) {
      expect(f.valid, f.t).toBe(false);
      expect(flagOf(f)).toBe(4);
      expect(reasons(f)).toContain('input_fault:back/co2/flatline');
    }
  });

  it('re-enters the windows only after three passing readings, and then they are valid again', () => {
    // The reading at `to` moves again (the 1st pass); the 3rd, 20 min later, clears the episode. A window is
    // clear of it when its previous window (storage) starts after that.
    const after = fluxes(records).filter((f) => span(f)[0] >= to);
    for (const f of after) expect(f.valid, f.t).toBe(span(f)[0] - W >= to + 20 * MIN);
    expect(after.filter((f) => f.valid).length).toBeGreaterThanOrEqual(8);
  });

  it('flags the carbonate records of the recovering sensor 4 with the reason, not its failed readings', () => {
    const rec = records.filter(
      (r) => r.type === 'carbonate' && r.station === 'back' && reasons(r).length > 0,
    );
    expect(rec.length).toBeGreaterThan(0);
    for (const r of rec) {
      expect(flagOf(r)).toBe(4);
      expect(reasons(r)).toEqual(['input_fault:back/co2/flatline']);
    }
    // readings the flat-line test failed give no carbonate record at all (docs/methods/qc.md 7.4)
    const failed = records.filter(
      (r) =>
        r.type === 'carbonate' &&
        r.station === 'back' &&
        Date.parse(r.t) > from + 40 * MIN &&
        Date.parse(r.t) < to,
    );
    expect(failed).toEqual([]);
  });

  it('resumes a checkpoint taken during the freeze with the same records as an uninterrupted run', () => {
    const cut = messages.findIndex((m) => m.tMs >= from + 70 * MIN);
    const a = startDeployment();
    const before = a.feed(messages.slice(0, cut));
    const snap = JSON.parse(JSON.stringify(a.processor.snapshot())) as ProcessorState;
    expect(snap.faults.sensors['back/co2']?.episodes.map((e) => e.fault)).toEqual(['flatline']);
    const b = startDeployment({}, snap);
    const after = [...b.feed(messages.slice(cut)), ...b.processor.drain()];
    expect([...before, ...after].map((r) => JSON.stringify(r))).toEqual(
      records.map((r) => JSON.stringify(r)),
    );
  });
});

describe('the reason of every invalid window, in every output', () => {
  const { records } = run({
    freezeBackPco2: [T0 + 6 * HOUR, T0 + 9 * HOUR],
    silenceCrestCtd: [T0 + 2 * HOUR, T0 + 3 * HOUR],
  });
  // The vocabulary: the validity tests of docs/methods/metabolism.md 6.6 and the input faults of faults.md 12.7.
  const REASON =
    /^(speed_below_min|reverse_flow|angle_off_transect|residence_above_max|depth_below_min|storage_dominates|input_qc_failed|input_missing|input_fault:[\w.-]+\/[\w.-]+\/(stale|flatline|range|spike|logbook_exclusion)|input_qc_failed:[\w.-]+\/[\w.-]+)$/;
  it('is named in invalid_reasons exactly when the window is not valid', () => {
    const f = fluxes(records);
    expect(f.filter((r) => !r.valid).length).toBeGreaterThan(25);
    for (const r of f) {
      expect(reasons(r).length > 0, r.t).toBe(!r.valid);
      for (const x of reasons(r)) expect(x).toMatch(REASON);
    }
  });
  it('reaches the database line and the JSON record alike', () => {
    const r = fluxes(records).find((x) => reasons(x).includes('input_fault:back/co2/flatline'))!;
    const line = recordToLine(r, 'v2');
    expect(line.ok && line.line).toContain('invalid_reasons="input_fault:back/co2/flatline');
    expect(JSON.parse(JSON.stringify(r)).invalid_reasons).toBe(r.invalid_reasons);
  });
});

describe('a silent CTD (stale)', () => {
  const from = T0 + 5 * HOUR;
  const to = T0 + 7 * HOUR;
  const { records } = run({ silenceCrestCtd: [from, to] });

  it('is stale 15 min after its last message, dated from the first one missed', () => {
    const a = records.find((r) => r.type === 'alert' && r.rule === 'stale' && r.state === 'raised');
    expect(a?.sensor).toBe('ctd');
    expect(Date.parse(a!.t) - (from - 5 * MIN)).toBe(15 * MIN);
  });

  it('flags the oxygen records built from its last values 4, and no window over the silence is valid', () => {
    const ox = records.filter((r) => r.type === 'oxygen' && r.station === 'crest' && reasons(r).length > 0);
    expect(ox.length).toBeGreaterThan(0);
    for (const r of ox) expect(reasons(r)).toEqual(['input_fault:crest/ctd/stale']);
    const over = fluxes(records).filter((f) => span(f)[1] > from && span(f)[0] < to);
    expect(over.length).toBe(14);
    for (const f of over) {
      expect(f.valid).toBe(false);
      expect(reasons(f)).toContain('input_fault:crest/ctd/stale');
    }
  });
});

describe('flag 3 is passed on, never made invalid by itself', () => {
  // O2 drifting to 470 umol/L at the crest passes the user range (450 umol/kg, docs/methods/qc.md 7.3) and
  // moves faster than the noise floor allows: suspect, not failed.
  const a = T0 + 4 * HOUR;
  const b = T0 + 8 * HOUR;
  const { records } = run({ crestO2OffsetUmolL: { span: [a, b], offset: 265 } });
  it('gives flag-3 oxygen records and flag-3, valid windows', () => {
    const ox = records.filter((r) => r.type === 'oxygen' && r.station === 'crest');
    expect(ox.every((r) => flagOf(r) <= 3)).toBe(true);
    expect(ox.filter((r) => flagOf(r) === 3).length).toBeGreaterThan(24);
    const inside = fluxes(records).filter((f) => span(f)[0] - W >= a + HOUR && span(f)[1] <= b - HOUR);
    expect(inside.length).toBe(7);
    for (const f of inside) {
      expect(flagOf(f), f.t).toBe(3);
      expect(f.valid, f.t).toBe(true);
    }
  });
});

describe('a frozen barometer', () => {
  const from = T0 + 4 * HOUR;
  const { records } = run({ freezeBaro: [from, T0 + 8 * HOUR] });
  it('is a faulty window input, but station records fall back to the standard barometer instead', () => {
    const a = records.find((r) => r.type === 'alert' && r.rule === 'flatline' && r.state === 'raised');
    expect(a?.sensor).toBe('met');
    const detected = Date.parse(a!.t);
    const ox = records.filter(
      (r) =>
        r.type === 'oxygen' && Date.parse(r.t) > detected + 20 * MIN && Date.parse(r.t) < from + 4 * HOUR,
    );
    expect(ox.length).toBeGreaterThan(20);
    for (const r of ox) {
      expect(reasons(r)).toEqual([]);
      expect(flagOf(r)).toBe(2); // docs/methods/conventions.md 1.5: a defaulted barometer
    }
    const over = fluxes(records).filter((f) => span(f)[0] > detected && span(f)[1] < from + 4 * HOUR);
    for (const f of over) expect(reasons(f)).toContain('input_fault:mast/met/flatline');
  });
});

describe('a single spike', () => {
  const at = T0 + 5 * HOUR;
  const messages = deploymentMessages(HOURS, { crestTempSpike: { atMs: at, offset: 2.5 } });
  it('marks the stored sample 4 once the next reading gives the verdict', () => {
    const { processor, feed } = startDeployment();
    feed(messages.filter((m) => m.tMs <= at));
    const temp = () => processor.snapshot().stations.crest!.temp;
    const flagAt = () => temp().f[temp().t.indexOf(at)];
    expect(flagAt()).toBeLessThan(4); // the spike test needs the next reading
    feed(messages.filter((m) => m.tMs > at && m.tMs <= at + 5 * MIN));
    expect(flagAt()).toBe(4);
  });
  it('makes the windows over it invalid, naming the failed sample', () => {
    const { records } = runDeployment(messages);
    const over = fluxes(records).filter((f) => span(f)[0] - W <= at && at < span(f)[1]);
    expect(over.length).toBe(6);
    for (const f of over) expect(reasons(f)).toContain('input_qc_failed:crest/ctd');
  });
});

describe('the logbook hook (faultsExternal)', () => {
  const from = T0 + 3 * HOUR;
  const to = T0 + 4 * HOUR;
  const messages = deploymentMessages(HOURS, {});
  const exclusions = exclusionsOf([
    { t: '2026-03-01T03:00:00Z', station: 'back', sensor: 'o2', event: 'cleaning', text: 'optode wiped' },
    {
      t: '2026-03-01T03:00:00Z',
      station: 'back',
      sensor: 'o2',
      event: 'cleaning',
      exclude_from: new Date(from).toISOString(),
      exclude_to: new Date(to).toISOString(),
    },
  ]);
  const { records, processor } = runDeployment(messages, { exclusions });
  it('takes the entries with an exclusion span from the logbook', () => {
    expect(exclusions).toEqual([{ station: 'back', sensor: 'o2', fromMs: from, toMs: to, note: 'cleaning' }]);
  });
  it('flags the records of the excluded sensor 4 and invalidates the windows over the span, no longer', () => {
    const ox = records.filter((r) => r.type === 'oxygen' && r.station === 'back');
    for (const r of ox) {
      const inside = Date.parse(r.t) >= from && Date.parse(r.t) < to;
      expect(reasons(r)).toEqual(inside ? ['input_fault:back/o2/logbook_exclusion'] : []);
    }
    for (const f of fluxes(records)) {
      const [s, e] = span(f);
      const overlaps = e > from && s - W < to;
      expect(f.valid, f.t).toBe(!overlaps);
      if (overlaps) expect(reasons(f)).toEqual(['input_fault:back/o2/logbook_exclusion']);
    }
  });
  it('applies a station-wide exclusion to every sensor of the station, once however often it is given', () => {
    const x = { station: 'crest', fromMs: from, toMs: to };
    const p = runDeployment(messages.slice(0, 10), { exclusions: [x, x] }).processor;
    const keys = Object.keys(p.snapshot().faults.sensors).filter((k) => k.startsWith('crest/'));
    expect(keys.sort()).toEqual(['crest/co2', 'crest/ctd', 'crest/o2', 'crest/p1']);
    for (const k of keys) expect(p.snapshot().faults.sensors[k]?.episodes.length).toBe(1);
    expect(processor.snapshot().faults.sensors['crest/ctd']?.episodes ?? []).toEqual([]);
  });
});

describe('bottle samples', () => {
  const { records, processor } = run({ bottlesAt: [T0 + HOUR, T0 + 2 * HOUR, T0 + 9 * HOUR] });
  it('are never stale, however long between campaigns', () => {
    expect(records.filter((r) => r.type === 'alert' && r.sensor === 'bottle')).toEqual([]);
    expect(processor.snapshot().faults.sensors['back/bottle']?.episodes).toEqual([]);
  });
});
