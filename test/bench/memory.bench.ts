// Memory of the processor against the number of stations, and the peak RSS with the dashboard's record
// history on. Each case runs in a child process of its own (a fresh heap): a configuration of N fictional
// stations with a CTD, an optode and a pCO2 sensor each, H simulated hours of their messages streamed (never
// held in memory) through parseMessage + checkAgainstConfig + processor.push, and, with the dashboard on,
// every record into the dashboard's RecordHistory (services/dashboard/history.ts, what the live dashboard
// keeps and serves). Per case: peak RSS, JS heap after a forced GC, the checkpoint size, and the share of
// the run's wall time spent in garbage collection (a GC profiler sums every pause).
// Baselines in the same run: the RSS of an idle node process (same binary) and of each child before its
// processor exists; the 1,000-station heap for the 2,000-station one (linear growth gives 2.0).
// Goals (issue 17): peak RSS < 300 MB at 1,000 stations with the dashboard on (over 48 h); processor
// memory linear in stations; GC < 5 %.
// Env: REEFD_BENCH_MEM_STATIONS (default 1000; the scaling case uses twice as many), REEFD_BENCH_MEM_HOURS
// (3: with the default windows the processor holds about 2.7 h of each series, so it has reached its steady
// size), REEFD_BENCH_MEM_DASH_HOURS (6; the dashboard keeps 48 h, so its share still grows after that).
import { execFileSync, spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { GCProfiler } from 'node:v8';
import { parseMessage } from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor } from '../../libs/processor/index.js';
import { simulate } from '../../libs/simulator/index.js';
import { RecordHistory } from '../../services/dashboard/history.js';
import { manyStations, parsed } from '../e2e/helpers/big-site.js';
import { summaryRow } from './lib/measure.js';

const MB = 1024 * 1024;
const gc = () => (globalThis as { gc?: () => void }).gc?.();

interface CaseResult {
  stations: number;
  hours: number;
  dashboard: boolean;
  messages: number;
  records: number;
  seconds: number;
  rssBeforeMb: number;
  peakRssMb: number;
  heapBeforeMb: number;
  heapAfterMb: number;
  stateMb: number;
  gcShare: number;
}

function runCase(stations: number, hours: number, dashboard: boolean): CaseResult {
  const config = parsed(manyStations(stations));
  gc();
  const before = process.memoryUsage();
  const processor = createProcessor(config);
  const history = dashboard ? new RecordHistory() : undefined;
  let messages = 0;
  let records = 0;
  let peakRss = before.rss;
  const prof = new GCProfiler();
  prof.start();
  const t0 = performance.now();
  for (const ev of simulate(config, {
    startMs: Date.UTC(2026, 10, 1),
    durationMs: hours * 3_600_000,
    seed: 3,
  })) {
    if (ev.type !== 'message') continue;
    const m = ev.message;
    const p = parseMessage(m.topic, Buffer.from(JSON.stringify(m.payload)), 'reef');
    if (!p.ok || checkAgainstConfig(config, p.message) !== undefined) continue;
    const out = processor.push(p.message, m.tMs + 150).records;
    records += out.length;
    if (history !== undefined && out.length > 0) history.add(out);
    if (++messages % 2000 === 0) peakRss = Math.max(peakRss, process.memoryUsage().rss);
  }
  const seconds = (performance.now() - t0) / 1000;
  const gcUs = (prof.stop()?.statistics ?? []).reduce((s, e) => s + e.cost, 0);
  gc();
  const after = process.memoryUsage();
  peakRss = Math.max(peakRss, after.rss);
  return {
    stations,
    hours,
    dashboard,
    messages,
    records,
    seconds,
    rssBeforeMb: before.rss / MB,
    peakRssMb: peakRss / MB,
    heapBeforeMb: before.heapUsed / MB,
    heapAfterMb: after.heapUsed / MB,
    stateMb: JSON.stringify(processor.snapshot()).length / MB,
    gcShare: gcUs / 1e3 / (seconds * 1000),
  };
}

const child = process.env.REEFD_BENCH_MEM_CASE;
if (child !== undefined) {
  const [n, h, d] = child.split(',');
  console.log(JSON.stringify(runCase(Number(n), Number(h), d === '1')));
  process.exit(0);
}

const stations = Number(process.env.REEFD_BENCH_MEM_STATIONS ?? 1000);
const hours = Number(process.env.REEFD_BENCH_MEM_HOURS ?? 3);
const dashHours = Number(process.env.REEFD_BENCH_MEM_DASH_HOURS ?? 6);
const self = fileURLToPath(import.meta.url);
const idleRss =
  Number(
    execFileSync(process.execPath, ['-e', 'setTimeout(() => console.log(process.memoryUsage().rss), 300)'], {
      encoding: 'utf8',
    }).trim(),
  ) / MB;

function spawnCase(n: number, h: number, dashboard: boolean): CaseResult {
  const r = spawnSync(process.execPath, ['--import', 'tsx', '--expose-gc', self], {
    encoding: 'utf8',
    env: { ...process.env, REEFD_BENCH_MEM_CASE: `${n},${h},${dashboard ? 1 : 0}` },
    maxBuffer: 1 << 20,
  });
  if (r.status !== 0) throw new Error(`memory case ${n} stations failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop() ?? '{}') as CaseResult;
}

const print = (c: CaseResult) =>
  console.log(
    `${String(c.stations).padStart(5)} stations, ${c.hours} h, dashboard ${c.dashboard ? 'on ' : 'off'}: ` +
      `${c.messages} messages, ${c.records} records in ${c.seconds.toFixed(1)} s; RSS ${c.rssBeforeMb.toFixed(0)} MB ` +
      `before -> peak ${c.peakRssMb.toFixed(0)} MB; heap ${c.heapBeforeMb.toFixed(1)} -> ${c.heapAfterMb.toFixed(1)} MB ` +
      `after GC; checkpoint ${c.stateMb.toFixed(1)} MB; GC ${(100 * c.gcShare).toFixed(1)} % of the run`,
  );

console.log(`idle node process RSS (baseline): ${idleRss.toFixed(1)} MB`);
const one = spawnCase(stations, hours, false);
print(one);
const two = spawnCase(2 * stations, hours, false);
print(two);
const dash = spawnCase(stations, dashHours, true);
print(dash);
const heapOne = one.heapAfterMb - one.heapBeforeMb;
const heapTwo = two.heapAfterMb - two.heapBeforeMb;
console.log(
  `processor heap growth: ${heapOne.toFixed(1)} MB at ${stations}, ${heapTwo.toFixed(1)} MB at ${2 * stations} ` +
    `(ratio ${(heapTwo / heapOne).toFixed(2)}; 2.00 is linear); per station ${((heapOne * 1024) / stations).toFixed(0)} kB`,
);
console.log(
  `dashboard on: peak RSS ${dash.peakRssMb.toFixed(0)} MB after ${dashHours} simulated h ` +
    `(its history keeps 48 h: more after that); ratio to the idle node RSS ${(dash.peakRssMb / idleRss).toFixed(1)}`,
);
summaryRow({
  id: 'rss',
  what: `peak RSS, ${stations} stations, dashboard history on (${dashHours} simulated h, processor in-process)`,
  baseline: `idle node ${idleRss.toFixed(0)} MB; same child before the processor ${dash.rssBeforeMb.toFixed(0)} MB`,
  measured: `${dash.peakRssMb.toFixed(0)} MB`,
  ratio: dash.peakRssMb / idleRss,
  goal: '< 300 MB over 48 h',
  met: dash.peakRssMb < 300,
  note: 'the simulator and tsx live in the same process; 48 h of `reefd run` is not measured here',
});
summaryRow({
  id: 'memory',
  what: `processor memory vs stations (${stations} -> ${2 * stations}), GC share`,
  baseline: `${heapOne.toFixed(1)} MB heap at ${stations}`,
  measured: `${heapTwo.toFixed(1)} MB at ${2 * stations}; GC ${(100 * one.gcShare).toFixed(1)} % / ${(100 * two.gcShare).toFixed(1)} %`,
  ratio: heapTwo / heapOne,
  goal: 'linear (ratio ~2.0), GC < 5 %',
  met: heapTwo / heapOne < 2.2 && Math.max(one.gcShare, two.gcShare) < 0.05,
});
