// Acknowledgement ceiling of the intake's archive path: the real MQTT source (PUBACK held until the archive
// fsync, Receive Maximum 1,000) -> parseMessage -> the raw archive writer -> ack, with no processor, against
// a no-op mqtt.js subscriber on the same broker (the baseline), in the same run. One publisher with 1,000
// in flight sends the demo site's mix (REEFD_BENCH_ACK_COPIES copies of its stations, default 4).
// Two archive paths, measured one after the other on fresh topics:
//   before: the line re-serialised (archiveLine: decode, JSON.parse, JSON.stringify) and commits on the
//           200 ms timer only (the writer's former policy: maxBatchLines unbounded, 4 MiB);
//   after:  the payload bytes spliced into the line (appendMessage) and commits on count, size or time.
// Also printed: the line building alone, per message (CPU time and heap bytes).
// Needs Mosquitto (deploy/dev/services.sh up). Env: REEFD_BENCH_ACK_N (messages, default 30,000).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { archiveLine, parseMessage } from '../../libs/contract/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { archiveLineBytes, createArchiveWriter, parsedAsJson } from '../../services/archive/index.js';
import { createLogger } from '../../services/log/logger.js';
import { createMqttSource } from '../../services/sources/index.js';
import { MQTT_URL, randomSuffix, requireService } from '../integration/env.js';
import { parsed, replicatedDemo } from '../e2e/helpers/big-site.js';
import { bytesPerCall, cpuMicros, summaryRow } from './lib/measure.js';
import { connect, noOpSubscriberRate, publishAll, type Outgoing } from './lib/mqtt.js';

const copies = Number(process.env.REEFD_BENCH_ACK_COPIES ?? 4);
const n = Number(process.env.REEFD_BENCH_ACK_N ?? 30_000);
await requireService('Mosquitto', MQTT_URL);

const config = parsed(replicatedDemo(copies));
const hours = Math.ceil(n / (copies * 204)) + 1;
const sim = simulateMessages(config, {
  startMs: Date.UTC(2026, 10, 1),
  durationMs: hours * 3_600_000,
  seed: 9,
});
const site = 'bench-site';
const list: Outgoing[] = sim.messages.slice(0, n).map((m) => ({
  rest: `${site}/${m.topic.split('/').slice(2).join('/')}`,
  payload: Buffer.from(JSON.stringify(m.payload)),
}));
console.log(`${list.length} messages (${copies} copies of the demo site)`);

// Line building alone.
const decoder = new TextDecoder('utf-8', { fatal: false });
const rxMs = Date.UTC(2026, 10, 1, 6);
const topicOf = (m: Outgoing) => `reef/${m.rest}`;
let k = 0;
const next = () => list[k++ % list.length] as Outgoing;
const [strUs, spliceUs] = cpuMicros([
  {
    label: 'archive line, re-serialised (before)',
    iter: 5000,
    fn: () => {
      const m = next();
      return archiveLine(topicOf(m), new Date(rxMs).toISOString(), decoder.decode(m.payload));
    },
  },
  {
    label: 'archive line, payload spliced (after)',
    iter: 5000,
    fn: () => {
      const m = next();
      return archiveLineBytes({ topic: topicOf(m), rxMs, payload: m.payload, json: true });
    },
  },
]) as [number, number];
const strBytes = bytesPerCall((i) => {
  const m = list[i % list.length] as Outgoing;
  return Buffer.from(archiveLine(topicOf(m), new Date(rxMs).toISOString(), decoder.decode(m.payload)));
});
const spliceBytes = bytesPerCall((i) => {
  const m = list[i % list.length] as Outgoing;
  return archiveLineBytes({ topic: topicOf(m), rxMs, payload: m.payload, json: true });
});
console.log(
  `line building: ${(strUs / spliceUs).toFixed(2)}x faster spliced; heap bytes per message ${Math.round(strBytes)} -> ${Math.round(spliceBytes)}`,
);

const logger = createLogger({ level: 'warn' });

const commitMs: number[] = [];

async function archivedRate(mode: 'before' | 'after'): Promise<number> {
  const prefix = `bench-${randomSuffix()}`;
  const dir = mkdtempSync(path.join(tmpdir(), 'reefd-bench-ack-'));
  const writer = await createArchiveWriter({
    dir,
    fsyncMs: 200,
    retentionDays: 0,
    clock: Date.now,
    ...(mode === 'before' ? { maxBatchLines: Infinity, maxBatchBytes: 4 * 1024 * 1024 } : {}),
  });
  const source = createMqttSource({
    url: MQTT_URL,
    clientId: `bench-ack-${prefix}`,
    cleanStart: true,
    sessionExpiryS: 0,
    topicPrefix: prefix,
    site,
    logger,
  });
  let acked = 0;
  let last = 0;
  let done: () => void = () => {};
  const all = new Promise<void>((r) => (done = r));
  await source.start((input) => {
    const p = parseMessage(input.topic, input.payload, prefix);
    const reject = p.ok ? undefined : p.reason;
    const archived =
      mode === 'before'
        ? writer.append(
            archiveLine(
              input.topic,
              new Date(input.rxMs).toISOString(),
              decoder.decode(input.payload),
              reject,
            ),
            input.rxMs,
          )
        : writer.appendMessage({
            topic: input.topic,
            rxMs: input.rxMs,
            payload: input.payload,
            json: parsedAsJson(p),
            ...(reject === undefined ? {} : { reject }),
          });
    void archived.then(() => {
      input.ack();
      last = performance.now();
      if (++acked === list.length) done();
    });
  });
  // The subscription is in place once the source is connected; a short settle for the SUBACK.
  for (let i = 0; i < 50 && !source.connected(); i++) await new Promise((r) => setTimeout(r, 100));
  await new Promise((r) => setTimeout(r, 300));
  const pub = await connect(`bench-pub-${prefix}`);
  const t0 = performance.now();
  await publishAll(pub, prefix, list);
  await Promise.race([all, new Promise((r) => setTimeout(r, 180_000))]);
  await pub.endAsync();
  await source.stop();
  const st = writer.stats();
  await writer.close();
  rmSync(dir, { recursive: true, force: true });
  const rate = (acked / (last - t0)) * 1000;
  console.log(
    `  ${mode}: ${acked}/${list.length} archived and acknowledged, ${Math.round(rate)} msg/s; ` +
      `${st.fsyncs} commits (${(st.lines / Math.max(1, st.fsyncs)).toFixed(0)} lines each on average, ` +
      `write + fsync ${(st.commitMsTotal / Math.max(1, st.fsyncs)).toFixed(1)} ms on average, ${st.commitMsMax.toFixed(0)} ms at most)`,
  );
  commitMs.push(st.commitMsTotal / Math.max(1, st.fsyncs));
  return rate;
}

const base = await noOpSubscriberRate(list);
console.log(`no-op mqtt.js subscriber (baseline): ${Math.round(base)} msg/s`);
const before = await archivedRate('before');
const after = await archivedRate('after');
console.log(
  `ratio to the no-op subscriber: before ${(before / base).toFixed(3)}, after ${(after / base).toFixed(3)} ` +
    `(after / before ${(after / before).toFixed(2)}x)`,
);
summaryRow({
  id: 'ack',
  what: 'acknowledgement ceiling (MQTT source -> archive fsync -> PUBACK, 1,000 in flight)',
  baseline: `no-op subscriber ${Math.round(base)} msg/s; timer-only commits ${Math.round(before)} msg/s`,
  measured: `${Math.round(after)} msg/s`,
  ratio: after / base,
  goal: 'none below the broker (ratio >= ~1 within noise)',
  met: after / base >= 0.9,
  note: `a commit (write + fsync) took ${commitMs[1]?.toFixed(1)} ms on average: with 1,000 in flight that bounds the rate near ${Math.round(1000 / ((commitMs[1] ?? 1) / 1000))} msg/s`,
});
