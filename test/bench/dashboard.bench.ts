// The dashboard's history at scale: 1,000 stations with an optode and a pCO2 sensor (the demo's cadences:
// oxygen records every 5 min, carbonate every 10 min) over 48 h, records with every field the processor
// writes (taken from a short demo run). Baseline, measured in the same run: the records kept whole for 48 h
// (what the dashboard did before) and saved as one string every minute. Measured: heap after a forced GC,
// the cost of adding records, and what a save writes and how long it holds the event loop.
// Goal (issue 6 and the performance issue): history small and bounded, saved incrementally; the daemon
// under 300 MB RSS at 1,000 stations with the dashboard on.
// Env: REEFD_BENCH_DASH_STATIONS (default 1000), REEFD_BENCH_DASH_HOURS (48), REEFD_BENCH_DASH_LOG_HOURS (6:
// the saves are measured over the first hours only, to keep the disk use of a bench run small).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { runDemo } from '../../services/dashboard/demo-records.js';
import {
  HistoryLog,
  RecordHistory,
  SensorWatch,
  type SensorHealthRow,
} from '../../services/dashboard/index.js';
import { manyStations, parsed } from '../e2e/helpers/big-site.js';

const stations = Number(process.env.REEFD_BENCH_DASH_STATIONS ?? 1000);
const hours = Number(process.env.REEFD_BENCH_DASH_HOURS ?? 48);
const logHours = Number(process.env.REEFD_BENCH_DASH_LOG_HOURS ?? 6);
const MB = 1024 * 1024;
const MIN = 60_000;
const gc = () => {
  globalThis.gc?.();
  globalThis.gc?.();
};
/** JS heap plus the typed arrays' buffers (outside the heap), after a forced, settled GC. */
const heap = () => {
  gc();
  const m = process.memoryUsage();
  return m.heapUsed + m.arrayBuffers;
};

// Record templates with every field the processor writes (extension fields, sigmas, flags).
const demo = runDemo({ startMs: Date.UTC(2026, 2, 1), hours: 2, seed: 3 }).batches.flatMap((b) => b.records);
const o2Template = demo.find((r) => r.type === 'oxygen' && r.station === 'crest') as DerivedRecord;
const co2Template = demo.find((r) => r.type === 'carbonate' && r.station === 'crest') as DerivedRecord;
const T0 = Date.UTC(2026, 10, 1);

/** The records of one simulated minute, for every station (values vary so nothing is shared). */
function minute(m: number): DerivedRecord[] {
  const out: DerivedRecord[] = [];
  const t = new Date(T0 + m * MIN).toISOString();
  for (let i = 0; i < stations; i++) {
    const station = `flat-${String(i).padStart(4, '0')}`;
    const phase = (i * 7 + m) % 5;
    if (phase === 0)
      out.push({
        ...o2Template,
        t,
        station,
        sensor: `o2-${i}`,
        o2_mg_l: 5 + Math.sin(m / 90 + i),
        o2_umol_kg: 160 + m / 100,
      });
    if ((i * 3 + m) % 10 === 0)
      out.push({ ...co2Template, t, station, sensor: `co2-${i}`, pco2_uatm: 400 + (m % 300) + i / 1000 });
  }
  return out;
}

const minutes = hours * 60;
console.log(
  `${stations} stations x (oxygen / 5 min + carbonate / 10 min), ${hours} simulated h (${minutes} minutes)`,
);

// --------------------------------------------------------------------------- the per-sensor view's state
// Every sensor's row read each simulated minute (new messages, falling supply voltages) for 48 h. A few MB
// are within the noise of one heap reading, so four watches are built and the growth divided by four.
const config = parsed(manyStations(stations));
const rows: SensorHealthRow[] = [];
for (const [station, st] of Object.entries(config.stations))
  for (const [sensor, sc] of Object.entries(st.sensors))
    rows.push({ station, sensor, kind: sc.kind, lastSeenMs: 0, batteryV: 12.6, flag: 1 });
const h1 = heap();
const watches: SensorWatch[] = [];
for (let k = 0; k < 4; k++) {
  const watch = new SensorWatch({ config, health: () => rows, minPollMs: 0, wallClock: () => 0 });
  for (let m = 0; m < minutes; m++) {
    for (const r of rows) {
      if ((m + r.sensor.length) % 5 !== 0) continue;
      r.lastSeenMs = T0 + m * MIN + k;
      r.batteryV = 12.6 - m / 10_000;
    }
    watch.poll();
  }
  watches.push(watch);
}
const watchHeap = (heap() - h1) / watches.length;
watches.length = 0;
console.log(
  `per-sensor view state: ${rows.length} sensors over 48 h, heap ${(watchHeap / MB).toFixed(1)} MB`,
);

// ------------------------------------------------------------------------------- the downsampled history
let h0 = heap();
const dir = mkdtempSync(path.join(tmpdir(), 'reefd-bench-dash-'));
const log = new HistoryLog({ dir, windowMs: 48 * 3_600_000 });
let logging = true;
const history = new RecordHistory({ onFinal: (r) => logging && log.append(r) });
let added = 0;
let addMs = 0;
let worstAddMs = 0;
const addPerMinute: number[] = [];
const saveMs: number[] = [];
let savedBefore = 0;
const bytesPerMinute: number[] = [];
for (let m = 0; m < minutes; m++) {
  const batch = minute(m);
  added += batch.length;
  const a = performance.now();
  history.add(batch);
  const d = performance.now() - a;
  addMs += d;
  worstAddMs = Math.max(worstAddMs, d);
  addPerMinute.push(d);
  if (logging) {
    const s = performance.now();
    await log.save();
    saveMs.push(performance.now() - s);
    bytesPerMinute.push(log.stats.savedBytes - savedBefore);
    savedBefore = log.stats.savedBytes;
    if (m >= logHours * 60) logging = false;
  }
}
const newHeap = heap() - h0;
rmSync(dir, { recursive: true, force: true });

let t0 = 0;

// ------------------------------------------------------------------------------------- baseline: whole records
h0 = heap();
t0 = performance.now();
const whole = new Map<string, DerivedRecord[]>();
let n = 0;
for (let m = 0; m < minutes; m++) {
  for (const r of minute(m)) {
    const key = `${r.type}|${r.station}|${(r as { sensor?: string }).sensor}`;
    let list = whole.get(key);
    if (!list) whole.set(key, (list = []));
    list.push(r);
    n++;
  }
}
const baseAddS = (performance.now() - t0) / 1000;
const baseHeap = heap() - h0;
t0 = performance.now();
let bigString: string | undefined = [...whole.values()]
  .flat()
  .map((r) => JSON.stringify(r))
  .join('\n');
const baseSaveMs = performance.now() - t0;
const baseSaveBytes = Buffer.byteLength(bigString);
bigString = undefined;
console.log(
  `baseline (whole records, 48 h):  ${n} records, heap ${(baseHeap / MB).toFixed(1)} MB, add ${((baseAddS * 1e6) / n).toFixed(2)} us/record, ` +
    `save = one ${(baseSaveBytes / MB).toFixed(1)} MB string in ${baseSaveMs.toFixed(0)} ms (every minute)`,
);
whole.clear();

/** Quantile of a sample. */
const pick = (xs: number[], q: number) => [...xs].sort((a, b) => a - b)[Math.floor((xs.length - 1) * q)] ?? 0;
const steady = bytesPerMinute.slice(20);
const meanBytes = steady.reduce((a, b) => a + b, 0) / Math.max(1, steady.length);
const sortedSave = [...saveMs].sort((a, b) => a - b);
const p99 = sortedSave[Math.floor(sortedSave.length * 0.99)] ?? 0;
console.log(
  `downsampled history (10-min buckets, 48 h): ${history.size} records in ${history.seriesCount} series, heap ${(newHeap / MB).toFixed(1)} MB ` +
    `(typed columns ${(history.columnBytes / MB).toFixed(1)} MB), add ${((addMs * 1000) / added).toFixed(2)} us/record; a minute's batch (~300 records) median ${pick(addPerMinute, 0.5).toFixed(1)} ms, p99 ${pick(addPerMinute, 0.99).toFixed(1)} ms, worst ${worstAddMs.toFixed(1)} ms (with GC)`,
);
console.log(
  `incremental save (every minute, first ${logHours} h): ${(meanBytes / 1024).toFixed(1)} kB appended per minute on average; ` +
    `time to complete (asynchronous appends, the event loop free meanwhile): median ${(sortedSave[Math.floor(sortedSave.length / 2)] ?? 0).toFixed(1)} ms, p99 ${p99.toFixed(1)} ms, worst ${(sortedSave.at(-1) ?? 0).toFixed(1)} ms`,
);
console.log(`ratio heap history / baseline:                 ${(newHeap / baseHeap).toFixed(3)}`);
console.log(`ratio bytes saved per minute / baseline:       ${(meanBytes / baseSaveBytes).toFixed(5)}`);
console.log(`ratio add cost / baseline:                     ${(addMs / 1000 / baseAddS).toFixed(2)}`);
console.log(
  `goal "history small, bounded, incremental": history and sensor view ${((newHeap + watchHeap) / MB).toFixed(1)} MB of the ` +
    `300 MB budget at ${stations} stations; ${newHeap + watchHeap < 60 * MB ? 'within' : 'NOT within'} a fifth of it`,
);
