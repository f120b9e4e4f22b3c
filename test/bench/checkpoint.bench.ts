// What a checkpoint costs the event loop: the former path (structuredClone of the processor state, then one
// JSON.stringify, then one write of the whole text) against the present one (the JSON made from the live
// state in pieces with the loop given back between them, written a batch at a time; services/daemon/
// checkpoint.ts). A processor of N fictional stations (CTD, optode, pCO2 each) is fed H simulated hours so
// its windows are full, then both paths write the same state, round after round, interleaved. The stall is
// what the daemon's own /metrics gauge reports (services/daemon/stall.ts, a 20 ms timer's lateness) over
// each write; the former path's synchronous part is also timed directly. A third path has the state in a
// processor worker thread (services/daemon/worker-processor.ts), which makes the JSON there.
// Goal (issue 17): event-loop stall < 100 ms in-process. Baseline in the same run: the former path.
// Env: REEFD_BENCH_CP_STATIONS (1000), REEFD_BENCH_CP_HOURS (3), REEFD_BENCH_CP_ROUNDS (3).
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseMessage } from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor } from '../../libs/processor/index.js';
import { simulate } from '../../libs/simulator/index.js';
import { checkpointPieces, writeFileAtomic } from '../../services/daemon/checkpoint.js';
import { newStream } from '../../services/daemon/cursor.js';
import { DEFAULT_PACING, type Pacing } from '../../services/daemon/json-pieces.js';
import { watchEventLoop } from '../../services/daemon/stall.js';
import { startProcessorWorker } from '../../services/daemon/worker-processor.js';
import { manyStations, parsed } from '../e2e/helpers/big-site.js';
import { median, summaryRow } from './lib/measure.js';

const stations = Number(process.env.REEFD_BENCH_CP_STATIONS ?? 1000);
const hours = Number(process.env.REEFD_BENCH_CP_HOURS ?? 3);
const rounds = Number(process.env.REEFD_BENCH_CP_ROUNDS ?? 3);
const MB = 1024 * 1024;

const config = parsed(manyStations(stations));
const processor = createProcessor(config);
const t0 = performance.now();
let messages = 0;
for (const ev of simulate(config, {
  startMs: Date.UTC(2026, 10, 1),
  durationMs: hours * 3_600_000,
  seed: 3,
})) {
  if (ev.type !== 'message') continue;
  const p = parseMessage(ev.message.topic, Buffer.from(JSON.stringify(ev.message.payload)), 'reef');
  if (!p.ok || checkAgainstConfig(config, p.message) !== undefined) continue;
  processor.push(p.message, ev.message.tMs + 150);
  messages++;
}
console.log(
  `${stations} stations fed ${messages} messages (${hours} simulated h) in ${((performance.now() - t0) / 1000).toFixed(1)} s`,
);

const dir = mkdtempSync(path.join(os.tmpdir(), 'reefd-bench-cp-'));
const file = path.join(dir, 'checkpoint.json');
const stream = newStream('bench');
const silence = { lastMs: 0 };

interface Run {
  stallMs: number;
  syncMs: number;
  wallMs: number;
}

/** The former checkpoint: a clone at rest, one stringify, one write. */
async function former(): Promise<Run> {
  const watch = watchEventLoop();
  watch.takeStallMaxS();
  const a = performance.now();
  const state = processor.snapshot();
  const text = JSON.stringify({ savedAt: new Date().toISOString(), stream, silence, state });
  const syncMs = performance.now() - a;
  await writeFileAtomic(file, text);
  const wallMs = performance.now() - a;
  const stallMs = watch.takeStallMaxS() * 1000;
  watch.close();
  return { stallMs, syncMs, wallMs };
}

/** The present checkpoint: pieces of the live state, the loop given back between them, written in batches. */
async function present(): Promise<Run> {
  const watch = watchEventLoop();
  watch.takeStallMaxS();
  let syncMs = 0;
  let last = performance.now();
  const pacing: Pacing = {
    ...DEFAULT_PACING,
    yieldNow: async () => {
      syncMs = Math.max(syncMs, performance.now() - last);
      await DEFAULT_PACING.yieldNow();
      last = performance.now();
    },
  };
  const a = performance.now();
  last = a;
  const pieces = await checkpointPieces(processor.snapshot({ copy: false }), stream, { silence }, pacing);
  syncMs = Math.max(syncMs, performance.now() - last);
  await writeFileAtomic(file, pieces);
  const wallMs = performance.now() - a;
  const stallMs = watch.takeStallMaxS() * 1000;
  watch.close();
  return { stallMs, syncMs, wallMs };
}

// The same state in a worker thread (REEFD_PROCESSOR_WORKER=1): the worker makes the JSON, this thread
// receives the bytes (transferred) and writes them.
const worker = await startProcessorWorker(config, processor.snapshot(), undefined);
async function inWorker(): Promise<Run> {
  const watch = watchEventLoop();
  watch.takeStallMaxS();
  const a = performance.now();
  const made = worker.checkpoint({ savedAt: new Date().toISOString(), stream, silence });
  const syncMs = performance.now() - a;
  await writeFileAtomic(file, await made);
  const wallMs = performance.now() - a;
  const stallMs = watch.takeStallMaxS() * 1000;
  watch.close();
  return { stallMs, syncMs, wallMs };
}

const before: Run[] = [];
const after: Run[] = [];
const offThread: Run[] = [];
for (let r = 0; r < rounds; r++) {
  before.push(await former());
  after.push(await present());
  offThread.push(await inWorker());
}
await worker.close();
const sizeMb = statSync(file).size / MB;
rmSync(dir, { recursive: true, force: true });

const med = (runs: Run[], k: keyof Run) => median(runs.map((x) => x[k]));
const show = (label: string, runs: Run[]) =>
  console.log(
    `${label.padEnd(58)} stall ${med(runs, 'stallMs').toFixed(0).padStart(5)} ms (worst ` +
      `${Math.max(...runs.map((x) => x.stallMs)).toFixed(0)}), longest synchronous part ` +
      `${med(runs, 'syncMs').toFixed(0).padStart(5)} ms, whole write ${med(runs, 'wallMs').toFixed(0)} ms`,
  );
console.log(`checkpoint of ${sizeMb.toFixed(1)} MB, ${rounds} rounds each, medians:`);
show('former: structuredClone + JSON.stringify + one write', before);
show('present: JSON in pieces of the live state, batched writes', after);
show('processor in a worker: JSON made there, bytes written here', offThread);
const worstAfter = Math.max(...after.map((x) => x.stallMs));
summaryRow({
  id: 'checkpoint-stall',
  what: `event-loop stall of one checkpoint, ${stations} stations (${sizeMb.toFixed(0)} MB), in-process`,
  baseline: `former path ${med(before, 'stallMs').toFixed(0)} ms`,
  measured: `${med(after, 'stallMs').toFixed(0)} ms (worst of ${rounds}: ${worstAfter.toFixed(0)} ms)`,
  ratio: med(after, 'stallMs') / med(before, 'stallMs'),
  goal: '< 100 ms in-process',
  met: worstAfter < 100,
});
const worstWorker = Math.max(...offThread.map((x) => x.stallMs));
summaryRow({
  id: 'checkpoint-stall-worker',
  what: `event-loop stall of one checkpoint, ${stations} stations, processor in a worker thread`,
  baseline: `former path ${med(before, 'stallMs').toFixed(0)} ms`,
  measured: `${med(offThread, 'stallMs').toFixed(0)} ms (worst of ${rounds}: ${worstWorker.toFixed(0)} ms; the worker busy ${med(offThread, 'wallMs').toFixed(0)} ms)`,
  ratio: med(offThread, 'stallMs') / med(before, 'stallMs'),
  goal: '< 100 ms in-process',
  met: worstWorker < 100,
});
