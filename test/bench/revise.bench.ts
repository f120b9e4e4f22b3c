// Cost of the live re-derivation of late lab results (libs/processor revise.ts), on the demo reef with bottle
// samplers at the flat and the back reef (the re-derivation's scope: 4 of its 7 stations), 48 h:
//   - keeping its snapshots and ring while nothing is late: CPU time of the run / the same run with the
//     re-derivation off (reviseMaxAgeMs 0), interleaved rounds, median;
//   - lab results arriving in two batches 12 h after the bottles: CPU time of the run / the on-time run, and
//     the longest single push (the one that re-derives a batch) against the median push;
//   - memory: heap held by a processor after 48 h (forced, settled GC), re-derivation on / off.
// Usage: npm run bench revise   (REEFD_BENCH_REVISE_HOURS, default 48)
import { readFileSync } from 'node:fs';
import {
  parseConfigText,
  parseMessage,
  type ReefdConfig,
  type SensorMessage,
} from '../../libs/contract/index.js';
import { createProcessor, type Processor, type ProcessorOptions } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { median } from './lib/measure.js';

const HOUR = 3_600_000;
const hours = Number(process.env.REEFD_BENCH_REVISE_HOURS ?? 48);
const START = Date.UTC(2026, 6, 14);

const text = readFileSync('deploy/demo/ornen-reef.yaml', 'utf8')
  .replace('co2-flat: { kind: pco2 }', 'co2-flat: { kind: pco2 }\n      bottle-flat: { kind: sample }')
  .replace('co2-back: { kind: pco2 }', 'co2-back: { kind: pco2 }\n      bottle-back: { kind: sample }');
const parsed = parseConfigText(text);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config: ReefdConfig = parsed.config;

const sim = simulateMessages(config, { startMs: START, durationMs: hours * HOUR, seed: 12, faults: false });
const messages = sim.messages.map((m) => {
  const r = parseMessage(m.topic, JSON.stringify(m.payload));
  if (!r.ok) throw new Error(r.reason);
  return { message: r.message, sendMs: m.tMs };
});
type Delivery = { message: SensorMessage; rxMs: number };
const onTime: Delivery[] = messages.map((d) => ({ message: d.message, rxMs: d.sendMs + 250 }));
const batch = (tMs: number) => START + (Math.floor((tMs - START) / (12 * HOUR)) + 1) * 12 * HOUR + 12 * HOUR;
const late: Delivery[] = messages
  .map((d) => ({
    message: d.message,
    rxMs: d.message.kind === 'sample' ? batch(d.message.tMs) : d.sendMs + 250,
  }))
  .sort((a, b) => a.rxMs - b.rxMs);
const bottles = messages.filter((d) => d.message.kind === 'sample').length;
console.log(
  `${messages.length} messages over ${hours} h, ${bottles} bottles; demo reef, bottle samplers at flat and back`,
);

function feed(
  list: Delivery[],
  options: ProcessorOptions,
): { cpuMs: number; pushes: number[]; p: Processor } {
  const p = createProcessor(config, undefined, options);
  const pushes: number[] = [];
  const t0 = process.cpuUsage();
  for (const d of list) {
    const a = performance.now();
    p.push(d.message, d.rxMs);
    pushes.push(performance.now() - a);
  }
  p.drain();
  const c = process.cpuUsage(t0);
  return { cpuMs: (c.user + c.system) / 1000, pushes, p };
}

const off = { reviseMaxAgeMs: 0 };
const rounds = { on: [] as number[], off: [] as number[], late: [] as number[] };
let longest = 0;
let typical = 0;
let counters = createProcessor(config).counters();
for (let r = 0; r < 3; r++) {
  globalThis.gc?.();
  rounds.off.push(feed(onTime, off).cpuMs);
  globalThis.gc?.();
  rounds.on.push(feed(onTime, {}).cpuMs);
  globalThis.gc?.();
  const l = feed(late, {});
  rounds.late.push(l.cpuMs);
  longest = Math.max(...l.pushes);
  typical = median(l.pushes);
  counters = l.p.counters();
}
const [on, offMs, lateMs] = [median(rounds.on), median(rounds.off), median(rounds.late)];
console.log(`on time, re-derivation off (baseline): ${offMs.toFixed(0)} ms CPU (median of 3)`);
console.log(
  `on time, re-derivation on:             ${on.toFixed(0)} ms CPU; ratio ${(on / offMs).toFixed(3)}`,
);
console.log(
  `lab results 12-24 h late in batches:    ${lateMs.toFixed(0)} ms CPU; ratio to on time ${(lateMs / on).toFixed(3)}; ` +
    `${counters.lateSamplesRevised} bottles re-derived, ${counters.revisedRecords} records revised`,
);
console.log(
  `longest push (a batch re-derived): ${longest.toFixed(0)} ms, ${(longest / typical).toFixed(0)} x the median push ` +
    `(${(typical * 1000).toFixed(0)} us)`,
);

function heldMb(options: ProcessorOptions): number {
  globalThis.gc?.();
  const before = process.memoryUsage().heapUsed;
  const { p } = feed(onTime, options);
  globalThis.gc?.();
  globalThis.gc?.();
  const after = process.memoryUsage().heapUsed;
  if (p.counters().accepted === 0) console.log('none');
  return (after - before) / 1e6;
}
const memOff = heldMb(off);
const memOn = heldMb({});
console.log(
  `heap held after ${hours} h: re-derivation off ${memOff.toFixed(1)} MB, on ${memOn.toFixed(1)} MB ` +
    `(${(memOn - memOff).toFixed(1)} MB of snapshots and ring over the 24-h reach)`,
);
