// Resident memory of the processor for 1,000 stations: a configuration of 1,000 fictional stations with a
// CTD, an optode and a pCO2 sensor each, a few simulated hours of their messages streamed (never held in
// memory) through parseMessage + checkAgainstConfig + processor.push in this process. Baseline: the RSS of
// an idle node process (spawned, same binary), and this process's own RSS before the processor exists.
// Goal (issue 6): < 300 MB for 1,000 stations.
// Env: REEFD_BENCH_MEM_STATIONS (default 1000), REEFD_BENCH_MEM_HOURS (default 3: with the default
// windows the processor keeps about 2.7 h of each series, so its state has reached its steady size).
import { execFileSync } from 'node:child_process';
import { checkAgainstConfig, createProcessor } from '../../libs/processor/index.js';
import { parseMessage } from '../../libs/contract/index.js';
import { simulate } from '../../libs/simulator/index.js';
import { manyStations, parsed } from '../e2e/helpers/big-site.js';

const stations = Number(process.env.REEFD_BENCH_MEM_STATIONS ?? 1000);
const hours = Number(process.env.REEFD_BENCH_MEM_HOURS ?? 3);
const MB = 1024 * 1024;
const gc = () => globalThis.gc?.();

const idleRss = Number(
  execFileSync(process.execPath, ['-e', 'setTimeout(() => console.log(process.memoryUsage().rss), 300)'], {
    encoding: 'utf8',
  }).trim(),
);
const config = parsed(manyStations(stations));
gc();
const before = process.memoryUsage();

const processor = createProcessor(config);
let messages = 0;
let rejected = 0;
let records = 0;
let peakRss = before.rss;
const t0 = performance.now();
for (const ev of simulate(config, {
  startMs: Date.UTC(2026, 10, 1),
  durationMs: hours * 3_600_000,
  seed: 3,
})) {
  if (ev.type !== 'message') continue;
  const m = ev.message;
  const p = parseMessage(m.topic, Buffer.from(JSON.stringify(m.payload)), 'reef');
  if (!p.ok || checkAgainstConfig(config, p.message) !== undefined) {
    rejected++;
    continue;
  }
  records += processor.push(p.message, m.tMs + 150).records.length;
  if (++messages % 2000 === 0) peakRss = Math.max(peakRss, process.memoryUsage().rss);
}
const seconds = (performance.now() - t0) / 1000;
gc();
const after = process.memoryUsage();
peakRss = Math.max(peakRss, after.rss);
const stateBytes = JSON.stringify(processor.snapshot()).length;

const mb = (x: number) => (x / MB).toFixed(1);
console.log(
  `${stations} stations x 3 sensors, ${hours} simulated h: ${messages} messages (${rejected} rejected), ` +
    `${records} records, ${seconds.toFixed(1)} s`,
);
console.log(`idle node process RSS (baseline):        ${mb(idleRss)} MB`);
console.log(
  `this process before the processor:       ${mb(before.rss)} MB RSS, heap ${mb(before.heapUsed)} MB`,
);
console.log(
  `after the run (gc):                      ${mb(after.rss)} MB RSS, heap ${mb(after.heapUsed)} MB`,
);
console.log(`peak RSS during the run:                 ${mb(peakRss)} MB`);
console.log(`processor state (checkpoint JSON):       ${mb(stateBytes)} MB`);
console.log(`RSS growth over the process before the run: ${mb(after.rss - before.rss)} MB`);
console.log(`ratio RSS after / idle node RSS:         ${(after.rss / idleRss).toFixed(2)}`);
console.log(
  `ratio heap growth / idle node RSS:       ${((after.heapUsed - before.heapUsed) / idleRss).toFixed(2)}`,
);
console.log(
  `goal RSS < 300 MB for 1,000 stations: ${peakRss < 300 * MB ? 'met' : 'NOT met'} (peak ${mb(peakRss)} MB; ` +
    `the simulator generating the messages lives in the same process and is included)`,
);
