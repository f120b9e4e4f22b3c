// The intake thread's share of derivation: the demo site's messages (REEFD_BENCH_WORKER_COPIES copies of its
// seven stations, REEFD_BENCH_WORKER_HOURS simulated hours) through the pipeline's processor step, once with
// the processor on this thread (the daemon's default) and once in a worker thread (REEFD_PROCESSOR_WORKER=1,
// services/daemon/worker-processor.ts), one message at a time and 64 at a time (the daemon's window with a
// worker, services/daemon/build-core.ts). Per case: the time this thread was busy per message (event-loop
// utilisation: what the intake can no longer spend on sockets, archive and acknowledgements), the rate, and
// the longest event-loop stall (the /metrics gauge's timer). Baseline in the same run: the in-process step.
import { parseMessage } from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import type { ProcessorStep } from '../../services/daemon/pipeline.js';
import { watchEventLoop } from '../../services/daemon/stall.js';
import { startProcessorWorker } from '../../services/daemon/worker-processor.js';
import { parsed, replicatedDemo } from '../e2e/helpers/big-site.js';
import { summaryRow } from './lib/measure.js';

const copies = Number(process.env.REEFD_BENCH_WORKER_COPIES ?? 4);
const hours = Number(process.env.REEFD_BENCH_WORKER_HOURS ?? 6);
const config = parsed(replicatedDemo(copies));
const sim = simulateMessages(config, {
  startMs: Date.UTC(2026, 2, 1),
  durationMs: hours * 3_600_000,
  seed: 5,
});
const list = sim.messages.flatMap((m) => {
  const p = parseMessage(m.topic, JSON.stringify(m.payload), config.topic_prefix);
  return p.ok && checkAgainstConfig(config, p.message) === undefined
    ? [{ m: p.message, rx: m.tMs + 250 }]
    : [];
});

interface Case {
  busyUsPerMsg: number;
  rate: number;
  stallMs: number;
  records: number;
}

/** Feeds every message, `window` of them at the step at a time, results taken in order (as the pipeline does). */
async function feed(step: ProcessorStep, window = 1): Promise<Case> {
  const watch = watchEventLoop();
  watch.takeStallMaxS();
  const elu0 = performance.eventLoopUtilization();
  const t0 = performance.now();
  let records = 0;
  const at: Promise<{ records: unknown[] }>[] = [];
  for (const d of list) {
    at.push(step.push(d.m, d.rx));
    if (at.length >= window) records += (await (at.shift() as (typeof at)[number])).records.length;
  }
  for (const p of at) records += (await p).records.length;
  const wallMs = performance.now() - t0;
  const elu = performance.eventLoopUtilization(elu0);
  const stallMs = watch.takeStallMaxS() * 1000;
  watch.close();
  return {
    busyUsPerMsg: (elu.active * 1000) / list.length,
    rate: list.length / (wallMs / 1000),
    stallMs,
    records,
  };
}

const local = createProcessor(config);
const inProcess = await feed({ push: async (m, rx) => local.push(m, rx) });
const worker = await startProcessorWorker(config, undefined, undefined);
const inWorker = await feed(worker.step);
await worker.close();
// The daemon's window with a worker (build-core.ts): 64 messages at the step.
const worker64 = await startProcessorWorker(config, undefined, undefined);
const inWorker64 = await feed(worker64.step, 64);
await worker64.close();

const show = (label: string, c: Case) =>
  console.log(
    `${label.padEnd(40)} intake thread busy ${c.busyUsPerMsg.toFixed(1).padStart(6)} us/message, ` +
      `${Math.round(c.rate)} msg/s, longest stall ${c.stallMs.toFixed(0)} ms, ${c.records} records`,
  );
console.log(
  `${list.length} messages (${copies} copies of the demo site, ${hours} simulated h), one at a time:`,
);
show('processor on the intake thread', inProcess);
show('processor in a worker thread', inWorker);
show('processor in a worker thread, 64 at a time', inWorker64);
if (inWorker.records !== inProcess.records)
  throw new Error('REEFD_BENCH_WORKER_RECORDS: the two cases differ');
summaryRow({
  id: 'worker-intake-busy',
  what: 'intake thread busy per message, processor in a worker thread (demo mix, one message at a time)',
  baseline: `processor on the intake thread ${inProcess.busyUsPerMsg.toFixed(1)} us/message, ${Math.round(inProcess.rate)} msg/s`,
  measured: `${inWorker.busyUsPerMsg.toFixed(1)} us/message, ${Math.round(inWorker.rate)} msg/s; longest stall ${inWorker.stallMs.toFixed(0)} ms (on the intake thread ${inProcess.stallMs.toFixed(0)} ms)`,
  ratio: inWorker.busyUsPerMsg / inProcess.busyUsPerMsg,
  goal: 'derivation off the intake thread',
  met: inWorker.busyUsPerMsg < inProcess.busyUsPerMsg,
});
summaryRow({
  id: 'worker-intake-rate',
  what: "processor step rate, worker thread with the daemon's window of 64 (demo mix)",
  baseline: `processor on the intake thread ${Math.round(inProcess.rate)} msg/s`,
  measured: `${Math.round(inWorker64.rate)} msg/s; intake thread busy ${inWorker64.busyUsPerMsg.toFixed(1)} us/message, longest stall ${inWorker64.stallMs.toFixed(0)} ms`,
  ratio: inWorker64.rate / inProcess.rate,
  goal: 'derivation off the intake thread without losing rate',
  met: inWorker64.rate >= inProcess.rate,
});
