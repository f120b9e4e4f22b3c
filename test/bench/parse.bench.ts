// Intake parsing, one message at a time as the daemon receives them (bytes in): the fast validation path
// (parseMessage today) against the same steps with zod alone (topic, UTF-8 decode, JSON.parse, zod), and
// against the floor of decode + JSON.parse with no validation, all in the same run. Three mixes: the demo
// site's messages as the simulator sends them (every kind, bursts included), its small messages only
// (CTD, optode, pCO2, PAR, met), and its pressure bursts only. CPU time per message and JS heap bytes
// allocated per message.
// Env: REEFD_BENCH_PARSE_COPIES (default 4 copies of the demo site), REEFD_BENCH_PARSE_HOURS (24).
import {
  parseTopic,
  validatePayloadZod,
  parseMessage,
  type MessageParse,
} from '../../libs/contract/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { parsed, replicatedDemo } from '../e2e/helpers/big-site.js';
import { bytesPerCall, cpuMicros, summaryRow } from './lib/measure.js';

const copies = Number(process.env.REEFD_BENCH_PARSE_COPIES ?? 4);
const hours = Number(process.env.REEFD_BENCH_PARSE_HOURS ?? 24);
const config = parsed(replicatedDemo(copies));
const sim = simulateMessages(config, {
  startMs: Date.UTC(2026, 10, 1),
  durationMs: hours * 3_600_000,
  seed: 8,
});
interface Wire {
  topic: string;
  kind: string;
  payload: Buffer;
}
const all: Wire[] = sim.messages.map((m) => ({
  topic: m.topic,
  kind: m.topic.split('/')[3] ?? '',
  payload: Buffer.from(JSON.stringify(m.payload)),
}));
const small = all.filter((w) => !['pressure', 'adcp'].includes(w.kind));
const bursts = all.filter((w) => w.kind === 'pressure');
const avgBytes = (ws: Wire[]) => ws.reduce((s, w) => s + w.payload.length, 0) / ws.length;
console.log(
  `${all.length} messages (${copies} copies of the demo site x ${hours} h; ${small.length} small, ` +
    `${bursts.length} pressure bursts of ${bursts[0] ? (JSON.parse(bursts[0].payload.toString()) as { p_dbar: unknown[] }).p_dbar.length : 0} samples)`,
);

const decoder = new TextDecoder('utf-8', { fatal: true });
const floor = (w: Wire): unknown => JSON.parse(decoder.decode(w.payload));
const zodOnly = (w: Wire): MessageParse | undefined => {
  const tp = parseTopic(w.topic, 'reef');
  if (!tp.ok) return undefined;
  return validatePayloadZod(tp.parts, JSON.parse(decoder.decode(w.payload)));
};
const fast = (w: Wire): MessageParse => parseMessage(w.topic, w.payload, 'reef');

// The two paths must agree before their speed means anything.
for (const w of all) {
  const a = JSON.stringify(fast(w));
  const b = JSON.stringify(zodOnly(w));
  if (a !== b) throw new Error(`REEFD_BENCH_MISMATCH: fast and zod paths differ on ${w.topic}`);
}

function mix(label: string, ws: Wire[]): { floorUs: number; zodUs: number; fastUs: number } {
  const n = ws.length;
  const per = Math.max(1, Math.round(20_000 / avgBytes(ws)) * 10);
  let i = 0;
  const next = () => ws[i++ % n] as Wire;
  console.log(`\n${label}: ${n} messages, ${Math.round(avgBytes(ws))} bytes on average`);
  const [floorUs, zodUs, fastUs] = cpuMicros([
    { label: '  decode + JSON.parse (no validation, the floor)', iter: per, fn: () => floor(next()) },
    { label: '  parse with zod alone (before)', iter: per, fn: () => zodOnly(next()) },
    { label: '  parseMessage, fast path (after)', iter: per, fn: () => fast(next()) },
  ]) as [number, number, number];
  const bFloor = bytesPerCall((k) => floor(ws[k % n] as Wire));
  const bZod = bytesPerCall((k) => zodOnly(ws[k % n] as Wire));
  const bFast = bytesPerCall((k) => fast(ws[k % n] as Wire));
  console.log(
    `  msg/s per core: floor ${Math.round(1e6 / floorUs)}, zod ${Math.round(1e6 / zodUs)}, fast ${Math.round(1e6 / fastUs)}`,
  );
  console.log(
    `  ratio fast / zod (speed-up): ${(zodUs / fastUs).toFixed(2)}x; fast / floor rate: ${(floorUs / fastUs).toFixed(2)}`,
  );
  console.log(
    `  heap bytes allocated per message: floor ${Math.round(bFloor)}, zod ${Math.round(bZod)}, fast ${Math.round(bFast)} ` +
      `(validation adds ${Math.round(bZod - bFloor)} -> ${Math.round(bFast - bFloor)})`,
  );
  return { floorUs, zodUs, fastUs };
}

mix('demo mix (all kinds)', all);
mix('small messages (ctd, oxygen, pco2, par, met, sample)', small);
const b = mix('pressure bursts', bursts);
summaryRow({
  id: 'parse',
  what: 'parse + validate one 2048-sample burst (part of the burst row)',
  baseline: `zod ${b.zodUs.toFixed(0)} us`,
  measured: `fast ${b.fastUs.toFixed(0)} us`,
  ratio: b.fastUs / b.zodUs,
  goal: 'faster than zod; equal decisions',
  met: b.fastUs < b.zodUs,
});
