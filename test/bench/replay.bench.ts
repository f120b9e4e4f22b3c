// Replay throughput: a simulated raw archive (>= 100k lines; the demo site's mix of kinds, replicated)
// through the processor in-process (parseArchiveLine + messageFromArchiveLine + processor.push, the loop
// of `reefd replay` without the file reading and NDJSON writing), against a baseline of parseArchiveLine +
// messageFromArchiveLine alone (JSON.parse + schema validation) on the same lines, in the same run.
// Goals: issue 6, >= 50,000 messages/s; issue 17, replay >= 0.35 of the parse-only baseline in one process,
// and a sharded replay >= 1.6x the single process on 2 cores (not built yet: printed as such).
// Env: REEFD_BENCH_REPLAY_COPIES (default 16 copies of the demo site), REEFD_BENCH_REPLAY_HOURS (32).
import { archiveLine, parseArchiveLine } from '../../libs/contract/index.js';
import { createProcessor, messageFromArchiveLine } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { parsed, replicatedDemo } from '../e2e/helpers/big-site.js';
import { summaryRow } from './lib/measure.js';

const copies = Number(process.env.REEFD_BENCH_REPLAY_COPIES ?? 16);
const hours = Number(process.env.REEFD_BENCH_REPLAY_HOURS ?? 32);
const config = parsed(replicatedDemo(copies));
const startMs = Date.UTC(2026, 10, 1);

let t = performance.now();
const sim = simulateMessages(config, { startMs, durationMs: hours * 3_600_000, seed: 6 });
// The archive as the daemon writes it: receive time a little after the sensor's send time.
const lines = sim.messages.map((m) =>
  archiveLine(m.topic, new Date(m.tMs + 150).toISOString(), JSON.stringify(m.payload)),
);
const bytes = lines.reduce((s, l) => s + l.length + 1, 0);
console.log(
  `archive: ${lines.length} lines (${(bytes / 1e6).toFixed(1)} MB), ${copies} copies of the demo site x ${hours} h, ` +
    `simulated in ${((performance.now() - t) / 1000).toFixed(1)} s`,
);

function baseline(): number {
  let ok = 0;
  for (const text of lines) {
    const l = parseArchiveLine(text);
    if (l.ok && messageFromArchiveLine(config, l.line).ok) ok++;
  }
  return ok;
}

function replay(): { ok: number; records: number } {
  const p = createProcessor(config);
  let ok = 0;
  let records = 0;
  for (const text of lines) {
    const l = parseArchiveLine(text);
    if (!l.ok) continue;
    const input = messageFromArchiveLine(config, l.line);
    if (!input.ok) continue;
    ok++;
    records += p.push(input.message, input.rxMs).records.length;
  }
  return { ok, records };
}

const rate = (n: number, ms: number) => (n / ms) * 1000;
const base: number[] = [];
const full: number[] = [];
let info = { ok: 0, records: 0 };
for (let rep = 0; rep < 3; rep++) {
  globalThis.gc?.();
  t = performance.now();
  const n = baseline();
  base.push(rate(n, performance.now() - t));
  globalThis.gc?.();
  t = performance.now();
  info = replay();
  full.push(rate(info.ok, performance.now() - t));
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? NaN;
const b = median(base);
const f = median(full);
console.log(`accepted ${info.ok} of ${lines.length} lines, ${info.records} records`);
console.log(`baseline (JSON.parse + schema validation): ${Math.round(b)} lines/s (median of 3)`);
console.log(`replay through the processor:             ${Math.round(f)} messages/s (median of 3)`);
console.log(`ratio replay / baseline: ${(f / b).toFixed(3)}`);
console.log(
  `goal >= 50000 messages/s: ${f >= 50_000 ? 'met' : 'NOT met'} (${(f / 50_000).toFixed(2)} x goal)`,
);
summaryRow({
  id: 'replay',
  what: 'replay / parse-only baseline (same archive, same run), one process',
  baseline: `${Math.round(b)} lines/s (JSON.parse + validation)`,
  measured: `${Math.round(f)} messages/s`,
  ratio: f / b,
  goal: '>= 0.35',
  met: f / b >= 0.35,
});
summaryRow({
  id: 'replay-sharded',
  what: 'sharded replay / single-process replay, 2 cores',
  baseline: `${Math.round(f)} messages/s single process`,
  measured: 'not built (issue 17 Deliver 3)',
  ratio: NaN,
  goal: '>= 1.6x',
  met: 'n/a',
});
