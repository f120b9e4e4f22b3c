// Late lab results, live (docs/methods/calibration.md 13.7): the processor fed in receive order, with bottles
// whose results come in batches from the lab hours after they were taken, re-derives the windows they change
// and sends those records again with `revision` and the same identity. Keeping the latest revision of each
// record gives exactly the records of the same deployment with the bottles received on time (which is what
// `reefd replay` gives for the archive). 48 h of the fictional reef's inner transect, 64 bottle pairs every
// 40 min (TA, DIC from the reef model's truth).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  parseConfigText,
  parseMessage,
  recordKey,
  type DerivedRecord,
  type ReefdConfig,
  type SensorMessage,
} from '../../libs/contract/index.js';
import { createProcessor, type ProcessorOptions, type ProcessorState } from '../../libs/processor/index.js';
import { simulateMessages, type StationTruth } from '../../libs/simulator/index.js';
import { LATE_CONFIG } from './inner-transect-config.js';

const HOUR = 3_600_000;
const START = Date.UTC(2026, 6, 14);
const HOURS = 48;
const BOTTLES = 64;
const iso = (ms: number) => new Date(ms).toISOString();

interface Delivery {
  message: SensorMessage;
  rxMs: number;
}

function configOf(extra = ''): ReefdConfig {
  const parsed = parseConfigText(LATE_CONFIG + extra);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.config;
}

let simulated: { sensors: Delivery[]; bottles: SensorMessage[] } | undefined;

/**
 * The sensor messages (received 250 ms after their time) and the bottle messages. The same for every
 * variant of the configuration used here (the simulator reads neither alkalinity setting).
 */
function deployment(config: ReefdConfig): { sensors: Delivery[]; bottles: SensorMessage[] } {
  simulated ??= simulate(config);
  return simulated;
}

function simulate(config: ReefdConfig): { sensors: Delivery[]; bottles: SensorMessage[] } {
  const sim = simulateMessages(config, { startMs: START, durationMs: HOURS * HOUR, seed: 5, faults: false });
  const parse = (topic: string, payload: unknown): SensorMessage => {
    const r = parseMessage(topic, JSON.stringify(payload));
    if (!r.ok) throw new Error(`${topic}: ${r.reason}`);
    return r.message;
  };
  const sensors = sim.messages
    .filter((m) => !m.topic.includes('/sample/'))
    .map((m) => ({ message: parse(m.topic, m.payload), rxMs: m.tMs + 250 }));
  const truth = new Map<string, StationTruth>();
  for (const r of sim.truth) if (r.kind === 'station') truth.set(`${r.station}|${r.t}`, r);
  const bottles: SensorMessage[] = [];
  for (let i = 0; i < BOTTLES; i++) {
    const t = START + HOUR + i * 40 * 60_000;
    for (const st of ['flat', 'back']) {
      const w = truth.get(`${st}|${iso(t)}`) as StationTruth;
      bottles.push(
        parse(`reef/ornen-reef/${st}/sample/bottle-${st}`, {
          v: 1,
          t: iso(t),
          ta_umol_kg: w.ta_umol_kg,
          dic_umol_kg: w.dic_umol_kg,
          sal: w.sal,
        }),
      );
    }
  }
  return { sensors, bottles };
}

/**
 * Feeds deliveries in receive order (restarting from a JSON checkpoint, as the daemon does, at restartRxMs);
 * returns every record out, and the processor's counters.
 */
function run(config: ReefdConfig, list: Delivery[], options: ProcessorOptions = {}, restartRxMs = Infinity) {
  const sorted = [...list].sort((a, b) => a.rxMs - b.rxMs);
  let p = createProcessor(config, undefined, options);
  let restarted = false;
  const records: DerivedRecord[] = [];
  for (const d of sorted) {
    if (!restarted && d.rxMs >= restartRxMs) {
      restarted = true;
      p = createProcessor(config, JSON.parse(JSON.stringify(p.snapshot())) as ProcessorState, options);
    }
    records.push(...p.push(d.message, d.rxMs).records);
  }
  records.push(...p.drain());
  return { records, counters: p.counters() };
}

/** The latest revision of each record (alerts left out: they are events, never revised). */
function latest(records: readonly DerivedRecord[]): Map<string, DerivedRecord> {
  const out = new Map<string, DerivedRecord>();
  for (const r of records) {
    if (r.type === 'alert') continue;
    const k = recordKey(r);
    const had = out.get(k);
    if (had === undefined || (r.revision ?? 0) >= (had.revision ?? 0)) out.set(k, r);
  }
  return out;
}

const strip = (r: DerivedRecord): string => {
  const { revision: _r, ...rest } = r as DerivedRecord & { revision?: number };
  return JSON.stringify(rest);
};

function compare(
  config: ReefdConfig,
  lateBy: (tMs: number) => number,
  options: ProcessorOptions = {},
  restartRxMs = Infinity,
) {
  const { sensors, bottles } = deployment(config);
  const onTime = run(
    config,
    [...sensors, ...bottles.map((m) => ({ message: m, rxMs: m.tMs + 250 }))],
    options,
  );
  const late = run(
    config,
    [...sensors, ...bottles.map((m) => ({ message: m, rxMs: lateBy(m.tMs) }))],
    options,
    restartRxMs,
  );
  return { onTime, late, want: latest(onTime.records), got: latest(late.records) };
}

/** Lab batches: every 12 h, the results of the bottles taken in the 12 h before are received. */
const batches12h = (tMs: number) => START + Math.ceil((tMs - START + 1) / (12 * HOUR)) * 12 * HOUR;

describe('late lab results re-derived live', () => {
  it('latest revisions equal the records with the bottles on time (alkalinity from salinity)', () => {
    const config = configOf();
    const { onTime, late, want, got } = compare(config, batches12h);
    expect([...got.keys()].sort()).toEqual([...want.keys()].sort());
    const differing = [...want].filter(([k, r]) => strip(got.get(k) as DerivedRecord) !== strip(r));
    expect(differing.map(([k]) => k)).toEqual([]);
    // The TA budget is used in every window holding a bottle, after revision as on time.
    const ta = (m: Map<string, DerivedRecord>) => [...m.values()].filter((r) => r.nec_method === 'ta').length;
    expect(ta(want)).toBe(3 * BOTTLES);
    expect(ta(got)).toBe(3 * BOTTLES);
    // First versions: only the windows still open when a batch came used its bottles (the last of each).
    const first = late.records.filter((r) => r.type === 'flux' && r.revision === undefined);
    const firstTa = first.filter((r) => r.nec_method === 'ta').length;
    expect(firstTa).toBeGreaterThan(0);
    expect(firstTa).toBeLessThan(20);
    // Only flux records changed (TA from salinity: carbonate records do not read bottles).
    const revised = late.records.filter((r) => r.revision !== undefined);
    expect(new Set(revised.map((r) => r.type))).toEqual(new Set(['flux']));
    expect(revised.every((r) => r.revision === 1)).toBe(true);
    // Every bottle whose windows had closed when its batch came (the batch's last bottles' had not).
    expect(late.counters.lateSamplesRevised).toBeGreaterThan(2 * BOTTLES - 20);
    expect(late.counters.lateSamplesNotRevised).toBe(0);
    expect(late.counters.revisedRecords).toBe(revised.length);
    expect(onTime.counters.revisedRecords).toBe(0);
    console.log(
      `live revision: ${revised.length} flux records revised for ${late.counters.lateSamplesRevised} late ` +
        `bottles in 4 lab batches; ` +
        `latest revisions equal the on-time records (${want.size} records)`,
    );
  }, 300_000);

  it('with TA carried from bottles, the carbonate records are revised too, and equal the on-time ones', () => {
    const config = configOf('alkalinity:\n  source: samples\n  ta_s35_umol_kg: 2300\n');
    const { late, want, got } = compare(config, batches12h);
    const differing = [...want].filter(([k, r]) => strip(got.get(k) as DerivedRecord) !== strip(r));
    expect(differing.map(([k]) => k)).toEqual([]);
    const revised = late.records.filter((r) => r.revision !== undefined);
    expect(revised.some((r) => r.type === 'carbonate' && r.ta_source === 'sample')).toBe(true);
  }, 300_000);

  it('a lab result older than the reach is used from then on only, and counted', () => {
    const config = configOf();
    // each received 6 h after it was taken, with a reach of 3 h
    const { late } = compare(config, (t) => t + 6 * HOUR, { reviseMaxAgeMs: 3 * HOUR });
    expect(late.counters.lateSamplesRevised).toBe(0);
    expect(late.counters.lateSamplesNotRevised).toBe(2 * BOTTLES);
    expect(late.records.some((r) => r.revision !== undefined)).toBe(false);
  }, 300_000);

  it('re-derivation off (reviseMaxAgeMs 0): late bottles change no record already sent', () => {
    const config = configOf();
    const { late } = compare(config, batches12h, { reviseMaxAgeMs: 0 });
    expect(late.records.some((r) => r.revision !== undefined)).toBe(false);
    expect(late.counters.lateSamplesNotRevised).toBeGreaterThan(2 * BOTTLES - 20);
    expect(late.counters.lateSamplesRevised).toBe(0);
  }, 300_000);

  it('after a restart (the ring is not in the checkpoint) earlier lab results are counted, later ones revised', () => {
    const config = configOf();
    // restart a minute before the second batch (bottles of 12:20 to 23:40, received at 24:00) comes in
    const { late, want, got } = compare(config, batches12h, {}, START + 24 * HOUR - 60_000);
    const secondBatch = 2 * 18; // bottles at 12:20 ... 23:40, both stations
    expect(late.counters.lateSamplesNotRevised).toBeGreaterThan(secondBatch - 6);
    expect(late.counters.lateSamplesNotRevised).toBeLessThanOrEqual(secondBatch);
    // first, third and fourth batches re-derived: from 24 h on, the records are the on-time ones
    const after = [...want].filter(([, r]) => Date.parse(r.t) >= START + 25 * HOUR);
    expect(after.length).toBeGreaterThan(1000);
    const differing = after.filter(([k, r]) => strip(got.get(k) as DerivedRecord) !== strip(r));
    expect(differing.map(([k]) => k)).toEqual([]);
  }, 300_000);

  it('on the whole demo reef (faults on), bottles at two stations: the part they can change is re-derived, the rest only clocked', () => {
    // Bottle samplers at the flat and the back reef: the scope is those, the crest (outer transect) and the
    // mast; the lagoon, channel and fore reef stations only move the scratch's clock.
    const text = readFileSync('deploy/demo/ornen-reef.yaml', 'utf8')
      .replace('co2-flat: { kind: pco2 }', 'co2-flat: { kind: pco2 }\n      bottle-flat: { kind: sample }')
      .replace('co2-back: { kind: pco2 }', 'co2-back: { kind: pco2 }\n      bottle-back: { kind: sample }');
    const parsedDemo = parseConfigText(text);
    if (!parsedDemo.ok) throw new Error(JSON.stringify(parsedDemo.problems));
    const demo = parsedDemo.config;
    const sim = simulateMessages(demo, { startMs: START, durationMs: 30 * HOUR, seed: 12 });
    const all = sim.messages.map((m) => {
      const r = parseMessage(m.topic, JSON.stringify(m.payload));
      if (!r.ok) throw new Error(r.reason);
      return { message: r.message, sendMs: m.tMs };
    });
    const onTime = run(
      demo,
      all.map((d) => ({ message: d.message, rxMs: d.sendMs + 250 })),
    );
    // the lab results come 5 h after the bottles were taken
    const late = run(
      demo,
      all.map((d) => ({
        message: d.message,
        rxMs: d.message.kind === 'sample' ? d.message.tMs + 5 * HOUR : d.sendMs + 250,
      })),
    );
    const want = latest(onTime.records);
    const got = latest(late.records);
    expect([...got.keys()].sort()).toEqual([...want.keys()].sort());
    const differing = [...want].filter(([k, r]) => strip(got.get(k) as DerivedRecord) !== strip(r));
    expect(differing.map(([k]) => k)).toEqual([]);
    const revised = late.records.filter((r) => r.revision !== undefined);
    expect(revised.length).toBeGreaterThan(10);
    // The inner transect's windows, and its daily budget built on them (daily-step.ts).
    expect(revised.every((r) => (r.type === 'flux' || r.type === 'daily') && r.transect === 'inner')).toBe(
      true,
    );
    expect(late.counters.lateSamplesRevised).toBeGreaterThanOrEqual(8);
  }, 300_000);
});
