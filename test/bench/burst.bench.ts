// One 2048-sample pressure burst through the intake and the processor, as the daemon handles it: the payload
// bytes -> parseMessage -> checkAgainstConfig -> processor.push (waves derived at once, reorder_min 0), in a
// processor fed the demo site's whole mix (REEFD_BENCH_BURST_COPIES copies, default 4, over 24 h), so the
// station has its CTD and barometer context. Per burst: the median and 90th percentile of the wall time
// of those steps over every burst of the run (other messages in between, so caches are as in service).
// Baselines in the same run (CPU time, interleaved): analyzeBurst alone on the same bursts (the analysis
// itself), JSON.parse of the payload (the floor of any intake), and the pieces the path was made of
// before: zod validation and the copy of p_dbar through Float64Array.from with a callback.
// Goal (issue 17): < 250 us per burst through the pipeline.
import {
  parseMessage,
  parseTopic,
  validatePayloadZod,
  type PressureMessage,
} from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { analyzeBurst } from '../../libs/waves/index.js';
import { parsed, replicatedDemo } from '../e2e/helpers/big-site.js';
import { bytesPerCall, cpuMicros, median, summaryRow } from './lib/measure.js';

const copies = Number(process.env.REEFD_BENCH_BURST_COPIES ?? 4);
const config = parsed(replicatedDemo(copies, { processing: { reorder_min: 0 } }));
const sim = simulateMessages(config, {
  startMs: Date.UTC(2026, 10, 1),
  durationMs: 24 * 3_600_000,
  seed: 12,
});
const wire = sim.messages.map((m) => ({
  topic: m.topic,
  tMs: m.tMs,
  payload: Buffer.from(JSON.stringify(m.payload)),
  burst: m.topic.split('/')[3] === 'pressure',
}));
const bursts = wire.filter((w) => w.burst);

function run(): { perBurstUs: number[]; records: number } {
  const processor = createProcessor(config);
  const perBurstUs: number[] = [];
  let records = 0;
  for (const w of wire) {
    const t0 = performance.now();
    const p = parseMessage(w.topic, w.payload, config.topic_prefix);
    if (!p.ok || checkAgainstConfig(config, p.message) !== undefined) continue;
    records += processor.push(p.message, w.tMs + 150).records.length;
    if (w.burst) perBurstUs.push((performance.now() - t0) * 1000);
  }
  return { perBurstUs, records };
}

run(); // warm-up: JIT, plan caches
const rounds = [run(), run(), run()];
const all = rounds.flatMap((r) => r.perBurstUs).sort((a, b) => a - b);
const pipelineUs = median(all);
const p90 = all[Math.floor(all.length * 0.9)] ?? NaN;
console.log(
  `${bursts.length} bursts of ${(JSON.parse(bursts[0]!.payload.toString()) as { p_dbar: unknown[] }).p_dbar.length} ` +
    `samples among ${wire.length} messages (${copies} copies of the demo site, 24 h), ${rounds[0]!.records} records a run`,
);
console.log(
  `through parseMessage + checkAgainstConfig + processor.push: median ${pipelineUs.toFixed(0)} us, ` +
    `90th percentile ${p90.toFixed(0)} us per burst (3 runs)`,
);

// The pieces, on the same bursts.
const messages = bursts.map((b) => {
  const p = parseMessage(b.topic, b.payload, 'reef');
  if (!p.ok) throw new Error(p.reason);
  return p.message as PressureMessage;
});
let k = 0;
const nextWire = () => bursts[k++ % bursts.length]!;
const nextMsg = () => messages[k++ % messages.length]!;
const analyse = (m: PressureMessage, p: ArrayLike<number | null>) =>
  analyzeBurst({
    pDbar: p,
    fsHz: m.fs_hz,
    t0Ms: m.tMs,
    sensorHeightM: 0.2,
    patmDbar: 10.13,
    rhoKgM3: 1022.5,
  });
const [jsonUs, zodUs, fastUs, copyUs, analysisUs] = cpuMicros([
  {
    label: 'JSON.parse of the payload (floor)',
    iter: 300,
    fn: () => JSON.parse(nextWire().payload.toString()),
  },
  {
    label: 'parse with zod validation (before)',
    iter: 300,
    fn: () => {
      const w = nextWire();
      const tp = parseTopic(w.topic, 'reef');
      return tp.ok ? validatePayloadZod(tp.parts, JSON.parse(w.payload.toString())) : undefined;
    },
  },
  {
    label: 'parseMessage, fast validation (after)',
    iter: 300,
    fn: () => parseMessage(nextWire().topic, nextWire().payload),
  },
  {
    label: 'Float64Array.from(p_dbar, callback) (before)',
    iter: 300,
    fn: () => Float64Array.from(nextMsg().p_dbar, (x) => (x === null ? Number.NaN : x)),
  },
  {
    label: 'analyzeBurst on p_dbar (the analysis itself)',
    iter: 300,
    fn: () => {
      const m = nextMsg();
      return analyse(m, m.p_dbar);
    },
  },
]) as [number, number, number, number, number];
const bytes = bytesPerCall(
  (i) => {
    const m = messages[i % messages.length]!;
    return analyse(m, m.p_dbar);
  },
  50,
  300,
);
console.log(`heap bytes allocated per analysis: ${Math.round(bytes)}`);
console.log(
  `pipeline / analysis alone: ${(pipelineUs / analysisUs).toFixed(2)}; ` +
    `parse: zod ${zodUs.toFixed(0)} us -> fast ${fastUs.toFixed(0)} us (JSON.parse ${jsonUs.toFixed(0)} us); ` +
    `the callback copy the processor still makes: ${copyUs.toFixed(0)} us`,
);
summaryRow({
  id: 'burst',
  what: 'one 2048-sample burst through the pipeline (parse + processor.push)',
  baseline: `analysis alone ${analysisUs.toFixed(0)} us; JSON.parse ${jsonUs.toFixed(0)} us`,
  measured: `${pipelineUs.toFixed(0)} us (median; p90 ${p90.toFixed(0)} us)`,
  ratio: pipelineUs / analysisUs,
  goal: '< 250 us',
  met: pipelineUs < 250,
  note: `parse ${zodUs.toFixed(0)} -> ${fastUs.toFixed(0)} us; the processor's Float64Array.from copy (${copyUs.toFixed(0)} us) is still in the path`,
});
