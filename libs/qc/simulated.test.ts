// The QC tests, the sensor-fault state and the alert engine on the fictional reef's message stream
// (libs/simulator), chained the way the processor chains them: false-alarm rates on clean data (faults off, many
// seeds) and detection delays of the scripted faults against the simulator's truth (docs/methods/faults.md 12.8).
import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createAlertEngine,
  createSiteSilence,
  DEFAULT_BATTERY_V,
  silenceCheck,
  silenceNextCheckMs,
  silenceOnMessage,
  type AlertRecord,
} from '../alerts/index.js';
import { parseConfigText, type ReefdConfig } from '../contract/index.js';
import { createRng, simulateMessages, type FaultTruth, type SimMessage } from '../simulator/index.js';
import {
  coLocatedDrift,
  createFaultState,
  createQcState,
  DEFAULT_DRIFT_LIMITS,
  DEFAULT_FAULT_OPTIONS,
  faultsAdvance,
  faultsOnBattery,
  faultsOnMessage,
  faultsOnQc,
  qcUpdate,
  type FaultChange,
  type FaultState,
  type QcState,
} from './index.js';

const H = 3_600_000;
const MIN = 60_000;

function demoConfig(keep: (kind: string) => boolean): ReefdConfig {
  const r = parseConfigText(
    readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
  );
  if (!r.ok) throw new Error('demo config invalid');
  const c = structuredClone(r.config);
  for (const st of Object.values(c.stations))
    for (const [id, s] of Object.entries(st.sensors)) if (!keep(s.kind)) delete st.sensors[id];
  return c;
}
// ADCP ensembles feed no QC test here; pressure bursts are slow to synthesise and run in their own, shorter set.
// A second CTD on the mid-flat frame gives the drift test two sensors of one kind in the same water.
const NO_BURSTS = demoConfig((k) => k !== 'adcp' && k !== 'pressure');
const flatSensors = NO_BURSTS.stations.flat!.sensors;
flatSensors['ctd-flat-b'] = structuredClone(flatSensors['ctd-flat']!);
const BURSTS = demoConfig((k) => k === 'pressure' || k === 'met');

/** The QC'd fields of each kind, as the messages carry them. */
const FIELDS: Record<string, readonly string[]> = {
  ctd: ['temp_c', 'sal'],
  oxygen: ['o2_umol_l', 'o2_mg_l'],
  pco2: ['pco2_uatm'],
  par: ['par_umol_m2_s'],
  met: ['wind_m_s', 'baro_hpa'],
};

interface ChainOut {
  alerts: AlertRecord[];
  silent: AlertRecord[];
  changes: FaultChange[];
  ledger: FaultState;
  /** `${variable}:${test}` -> [flagged 3 or 4, evaluated]. */
  tally: Map<string, [number, number]>;
  /** Final flags per sample: `${station}/${sensor}/${variable}` -> [tMs, spike flag][] (spikes only). */
  spikes: Map<string, [number, number][]>;
  /** The two mid-flat CTDs' series: `${sensor}/${variable}` -> times and values. */
  ctd: Map<string, { tMs: number[]; v: number[] }>;
}

/** Runs one stream through QC, the sensor-fault state, the alert engine and the wall-clock silence watch. */
function chain(messages: readonly SimMessage[], silenceMin = 15): ChainOut {
  const engine = createAlertEngine(undefined, 'ornen-reef');
  const ledger = createFaultState();
  const qc = new Map<string, QcState>();
  const silence = createSiteSilence('ornen-reef', messages[0]?.tMs ?? 0);
  const sCfg = { silenceMs: silenceMin * MIN, severity: 'critical' as const };
  const out: ChainOut = {
    alerts: [],
    silent: [],
    changes: [],
    ledger,
    tally: new Map(),
    spikes: new Map(),
    ctd: new Map(),
  };
  const count = (k: string, f: number | undefined) => {
    if (f !== 1 && f !== 3 && f !== 4) return;
    const x = out.tally.get(k) ?? [0, 0];
    x[1]++;
    if (f >= 3) x[0]++;
    out.tally.set(k, x);
  };
  let baroDbar = 1.0125;
  let watermark = -Infinity;
  for (const m of messages) {
    // The daemon's timer at the silence deadline, then the message (wall time = its send time).
    const due = silenceNextCheckMs(silence, sCfg);
    if (due !== null && due <= m.tMs) out.silent.push(...silenceCheck(silence, sCfg, due));
    out.silent.push(...silenceOnMessage(silence, sCfg, m.tMs));

    const [, , station = '', kind = '', sensor = ''] = m.topic.split('/');
    const p = m.payload;
    const tMs = Date.parse(p.t as string);
    const key = `${station}/${sensor}`;
    out.changes.push(...faultsOnMessage(ledger, DEFAULT_FAULT_OPTIONS, key, kind, tMs));
    const values: [string, number][] = [];
    for (const f of FIELDS[kind] ?? []) if (typeof p[f] === 'number') values.push([f, p[f] as number]);
    if (kind === 'met') baroDbar = (p.baro_hpa as number) / 100;
    if (kind === 'pressure') {
      const ps = p.p_dbar as number[];
      const mean = ps.reduce((a, x) => a + x, 0) / ps.length;
      values.push(['depth_m', ((mean - baroDbar) * 1e4) / (1025 * 9.80665) + 0.2]);
    }
    if (typeof p.battery_v === 'number') values.push(['battery_v', p.battery_v]);
    for (const [variable, v] of values) {
      const qk = `${key}/${variable}`;
      if (station === 'flat' && kind === 'ctd') {
        const series = out.ctd.get(`${sensor}/${variable}`) ?? { tMs: [], v: [] };
        series.tMs.push(tMs);
        series.v.push(v);
        out.ctd.set(`${sensor}/${variable}`, series);
      }
      let s = qc.get(qk);
      if (s === undefined) qc.set(qk, (s = createQcState(variable)));
      const r = qcUpdate(s, tMs, v);
      for (const [test, f] of Object.entries(r.tests)) if (test !== 'spike') count(`${variable}:${test}`, f);
      if (r.finalizedPrevious) {
        count(`${variable}:spike`, r.finalizedPrevious.tests.spike);
        const sp = out.spikes.get(qk) ?? [];
        sp.push([r.finalizedPrevious.tMs, r.finalizedPrevious.tests.spike ?? 2]);
        out.spikes.set(qk, sp);
      }
      out.changes.push(...faultsOnQc(ledger, DEFAULT_FAULT_OPTIONS, key, kind, variable, tMs, r));
      if (variable === 'battery_v') {
        const cut = DEFAULT_BATTERY_V[kind] as number;
        out.changes.push(...faultsOnBattery(ledger, DEFAULT_FAULT_OPTIONS, key, kind, tMs, v, cut));
      }
      out.alerts.push(...engine.observe(`${kind}.${variable}`, station, sensor, tMs, v, r));
    }
    if (tMs > watermark) watermark = tMs;
    out.changes.push(...faultsAdvance(ledger, DEFAULT_FAULT_OPTIONS, watermark));
    out.alerts.push(...engine.advance(watermark));
  }
  return out;
}

const SEEDS = [1, 2, 3, 4, 5, 6];
const startOf = (seed: number) => Date.UTC(2026, 0, 5) + seed * 23 * 86_400_000; // spread over the year

describe('false alarms on clean simulated data (faults off; docs/methods/faults.md 12.8)', () => {
  const tally = new Map<string, [number, number]>();
  const alerts: AlertRecord[] = [];
  const changes: FaultChange[] = [];
  const drift: { variable: string; flag: number; change: number }[] = [];
  const add = (o: ChainOut) => {
    // Drift between the two mid-flat CTDs over the whole 48 h and over each day.
    for (const variable of ['temp_c', 'sal']) {
      const a = o.ctd.get(`ctd-flat/${variable}`);
      const b = o.ctd.get(`ctd-flat-b/${variable}`);
      if (a === undefined || b === undefined) continue;
      const t0 = a.tMs[0]!;
      for (const [from, to] of [
        [0, 48],
        [0, 24],
        [24, 48],
      ] as const) {
        const cut = (x: { tMs: number[]; v: number[] }) => {
          const i = x.tMs.findIndex((t) => t >= t0 + from * H);
          const j = x.tMs.findIndex((t) => t >= t0 + to * H);
          return { tMs: x.tMs.slice(i, j < 0 ? undefined : j), v: x.v.slice(i, j < 0 ? undefined : j) };
        };
        const r = coLocatedDrift(cut(a), cut(b), DEFAULT_DRIFT_LIMITS[variable]!);
        drift.push({ variable, flag: r.flag, change: r.change });
      }
    }
    for (const [k, [a, n]] of o.tally) {
      const x = tally.get(k) ?? [0, 0];
      tally.set(k, [x[0] + a, x[1] + n]);
    }
    alerts.push(...o.alerts, ...o.silent);
    changes.push(...o.changes);
  };
  let rows: [string, [number, number]][] = [];
  beforeAll(() => {
    for (const seed of SEEDS) {
      const run = simulateMessages(NO_BURSTS, {
        startMs: startOf(seed),
        durationMs: 48 * H,
        seed,
        faults: false,
      });
      add(chain(run.messages));
    }
    const run = simulateMessages(BURSTS, { startMs: startOf(1), durationMs: 48 * H, seed: 1, faults: false });
    add(chain(run.messages));
    rows = [...tally].sort(([a], [b]) => (a < b ? -1 : 1));
    console.log(
      'false-flag rate per test on clean data (flags 3-4 / evaluated):\n' +
        rows.map(([k, [a, n]]) => `  ${k.padEnd(28)} ${((100 * a) / n).toFixed(3)} % of ${n}`).join('\n'),
    );
  }, 180_000);

  it('keeps every test of every variable under 1 % false flags', () => {
    // Every QC'd field of the demo: CTD, optode (both units), pCO2, PAR, wind, barometer, burst depth, battery.
    for (const v of ['temp_c', 'sal', 'o2_umol_l', 'o2_mg_l', 'pco2_uatm', 'baro_hpa', 'depth_m']) {
      for (const t of ['spike', 'rate_of_change', 'flat_line', 'stuck', 'gross_range']) {
        if (v === 'baro_hpa' && t === 'stuck') continue; // no stuck-at values: 0 hPa fails gross range
        if (v === 'depth_m' && t === 'rate_of_change') continue; // burst depth: no rate-of-change test (7.3)
        expect(tally.get(`${v}:${t}`)?.[1] ?? 0, `${v}:${t} evaluated`).toBeGreaterThan(500);
      }
    }
    for (const [k, [a, n]] of rows) expect(a / n, k).toBeLessThan(0.01);
  });

  it('finds no drift between two healthy CTDs in the same water (36 evaluations of 1-2 days)', () => {
    expect(drift.length).toBe(SEEDS.length * 2 * 3);
    expect(drift.filter((d) => d.flag !== 1)).toEqual([]);
    console.log(
      `co-located CTDs, largest change of B - A judged: temp ${Math.max(...drift.filter((d) => d.variable === 'temp_c').map((d) => Math.abs(d.change))).toFixed(4)} degC, ` +
        `sal ${Math.max(...drift.filter((d) => d.variable === 'sal').map((d) => Math.abs(d.change))).toFixed(4)}`,
    );
  });

  it('raises no fault alert, no site silence and no sensor fault on clean data', () => {
    expect(alerts.filter((a) => a.class === 'fault')).toEqual([]);
    expect(changes).toEqual([]);
  });
});

describe('constant water: the noise floor of the rate-of-change test (issue 13: 3.4 % false flags)', () => {
  // Salinity at 35.2 with the simulator's CTD noise (0.003, reported to 4 decimals), 5-min samples for 10 days.
  const rng = createRng(7);
  const xs = Array.from({ length: 2880 }, () => Math.round((35.2 + 0.003 * rng.normal()) * 1e4) / 1e4);
  const rate = (noiseK?: number): number => {
    const base = createQcState('sal').limits.rateOfChange!;
    const s = createQcState({
      variable: 'sal',
      rateOfChange: noiseK === undefined ? base : { ...base, noiseK },
    });
    let n = 0;
    let a = 0;
    xs.forEach((x, i) => {
      const f = qcUpdate(s, Date.UTC(2026, 6, 1) + i * 5 * MIN, x).tests.rate_of_change;
      if (f === 1 || f === 3) {
        n++;
        if (f === 3) a++;
      }
    });
    return a / n;
  };
  it('3 sd of the 25-h sd alone flags ~3.4 % (P(|Z| > 3/sqrt 2), normal tail); the floor flags under 0.1 %', () => {
    const without = rate(0);
    expect(without).toBeGreaterThan(0.025);
    expect(without).toBeLessThan(0.045);
    expect(rate()).toBeLessThan(0.001);
  });
});

describe('detection of the scripted faults (docs/methods/faults.md 12.8)', () => {
  type Run = { run: ReturnType<typeof simulateMessages>; out: ChainOut };
  let runs: Run[] = [];
  beforeAll(() => {
    runs = SEEDS.slice(0, 3).map((seed) => {
      const run = simulateMessages(NO_BURSTS, { startMs: startOf(seed), durationMs: 48 * H, seed });
      return { run, out: chain(run.messages) };
    });
  }, 180_000);
  const fault = (r: Run, f: FaultTruth['fault']) =>
    r.run.truth.find((x): x is FaultTruth => x.kind === 'fault' && x.fault === f) as FaultTruth;
  const raisedAfter = (r: Run, rule: string, f: FaultTruth, sensor?: string) =>
    [...r.out.alerts, ...r.out.silent].find(
      (a) =>
        a.rule === rule &&
        a.state === 'raised' &&
        (sensor === undefined || a.sensor === sensor) &&
        Date.parse(a.t) >= f.startMs,
    );
  const delays: Record<string, number[]> = {};
  const note = (what: string, ms: number) => (delays[what] ??= []).push(ms / MIN);

  it('frozen pCO2: flat-line alert within 60 min, the fault dated from its first frozen reading', () => {
    for (const r of runs) {
      const f = fault(r, 'flatline');
      const a = raisedAfter(r, 'flatline', f, f.sensor);
      expect(a).toBeDefined();
      const delayMs = Date.parse(a!.t) - f.startMs;
      note('frozen pCO2 -> flatline alert', delayMs);
      expect(delayMs).toBeLessThanOrEqual(60 * MIN);
      const ep = r.out.changes.find((c) => c.key === `${f.station}/${f.sensor}` && c.fault === 'flatline');
      expect(ep?.change).toBe('opened');
      // The first frozen reading is the first pCO2 sample at or after the fault start (10-min cadence).
      expect(ep!.sinceMs - f.startMs).toBeGreaterThanOrEqual(0);
      expect(ep!.sinceMs - f.startMs).toBeLessThan(10 * MIN);
      // It re-enters three samples after the freeze ends, not before.
      const cleared = r.out.changes.find(
        (c) => c.key === ep!.key && c.fault === 'flatline' && c.change === 'cleared',
      );
      expect(cleared!.atMs).toBeGreaterThanOrEqual(f.endMs + 20 * MIN);
      expect(cleared!.atMs).toBeLessThan(f.endMs + 40 * MIN);
    }
  });

  it('dead CTD: stale within 3 of its intervals, and no other sensor stale', () => {
    for (const r of runs) {
      const f = fault(r, 'stale');
      const a = raisedAfter(r, 'stale', f, f.sensor);
      const delayMs = Date.parse(a!.t) - f.startMs;
      note('dead CTD -> stale alert', delayMs);
      expect(delayMs).toBeLessThanOrEqual(15 * MIN);
      const stale = r.out.alerts.filter((x) => x.rule === 'stale' && x.state === 'raised');
      expect(stale.map((x) => x.sensor)).toEqual([f.sensor]);
      expect(r.out.changes.some((c) => c.fault === 'stale' && c.key.endsWith(f.sensor))).toBe(true);
    }
  });

  it('failing battery: a trend warning hours before the cut-off', () => {
    for (const r of runs) {
      const f = fault(r, 'battery');
      const warn = raisedAfter(r, 'battery_trend', f, f.sensor);
      const low = raisedAfter(r, 'battery', f, f.sensor);
      expect(warn).toBeDefined();
      expect(low).toBeDefined();
      note('failing battery -> battery_trend warning', Date.parse(warn!.t) - f.startMs);
      note('failing battery -> battery (cut-off) alert', Date.parse(low!.t) - f.startMs);
      expect(Date.parse(low!.t) - Date.parse(warn!.t)).toBeGreaterThan(3 * H);
      // The only battery warnings of the run are the failing sensor's.
      expect(new Set(r.out.alerts.filter((x) => x.fault === 'battery').map((x) => x.sensor))).toEqual(
        new Set([f.sensor]),
      );
    }
  });

  it('silent uplink: site_silent within silence_min + 1 min on the wall clock, cleared by the backlog', () => {
    for (const r of runs) {
      const f = fault(r, 'silent');
      const a = r.out.silent.find((x) => x.state === 'raised');
      const delayMs = Date.parse(a!.t) - f.startMs;
      note('silent uplink -> site_silent', delayMs);
      expect(delayMs).toBeLessThanOrEqual(16 * MIN);
      const c = r.out.silent.find((x) => x.state === 'cleared');
      expect(Date.parse(c!.t)).toBe(f.endMs);
      expect(c!.id).toBe(a!.id);
      // Store and forward: event time has no gap, so no sensor goes stale in the outage.
      expect(r.out.alerts.filter((x) => x.rule === 'stale' && Date.parse(x.t) < f.endMs + H)).toEqual([]);
    }
  });

  it('a drift of 0.02 degC/day added to the second CTD is flagged within two days', () => {
    for (const r of runs) {
      const a = r.out.ctd.get('ctd-flat/temp_c')!;
      const b = r.out.ctd.get('ctd-flat-b/temp_c')!;
      const drifting = { tMs: b.tMs, v: b.v.map((v, i) => v + (0.02 * (b.tMs[i]! - b.tMs[0]!)) / (24 * H)) };
      const d = coLocatedDrift(a, drifting, DEFAULT_DRIFT_LIMITS.temp_c!);
      expect(d.flag).toBe(3); // 0.04 degC over 2 days: over 0.02, under 0.05
      expect(d.slopePerDay).toBeCloseTo(0.02, 2);
      expect(coLocatedDrift(a, b, DEFAULT_DRIFT_LIMITS.temp_c!).flag).toBe(1);
    }
  });

  it('scripted spikes fail the spike test on the next sample', () => {
    for (const r of runs) {
      for (const f of r.run.truth.filter((x): x is FaultTruth => x.kind === 'fault' && x.fault === 'spike')) {
        const variable = f.sensor.startsWith('o2') ? 'o2_umol_l' : 'temp_c';
        const flags = r.out.spikes.get(`${f.station}/${f.sensor}/${variable}`) ?? [];
        const hit = flags.find(([t]) => t >= f.startMs);
        expect(hit?.[1], `${f.sensor}`).toBe(4);
      }
    }
    console.log(
      'detection delay after the fault starts, min (3 seeds):\n' +
        Object.entries(delays)
          .map(([k, v]) => `  ${k.padEnd(44)} ${v.map((x) => x.toFixed(1)).join(', ')}`)
          .join('\n'),
    );
  });
});
