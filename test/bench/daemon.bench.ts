// The whole daemon under load: real Mosquitto in, real VictoriaMetrics out, derivations on, the demo site's
// mix of kinds from the simulator (REEFD_BENCH_DAEMON_COPIES copies of its seven stations, default 4).
// (a) Sustained intake: the same messages, published at QoS 1 as fast as one mqtt.js publisher can (window
//     of 1,000 in flight), to a no-op mqtt.js subscriber and to `reefd run` (a child process, run from the
//     sources through tsx); rate = messages / (first publish -> last message processed, read from the
//     daemon's reefd_messages_in_total, polled every 100 ms). Printed as the ratio daemon / subscriber.
// (b) Latency at a fixed rate (5,000 msg/s for 20 s, then lower rates for 10 s each until one is
//     sustained: all processed, backlog gone within 1 s of the last publish, p99 after the first fifth
//     < 1 s), publish -> the point written by the database sink, measured with a local HTTP receiver posing as the database
//     (/api/v2/write), which timestamps each line on arrival in this process, so both ends use one clock and
//     no database polling interval is added. Matched for oxygen records (one per optode message, same
//     station and time). The sink runs with flush_ms 100 (its default, 1,000 ms, would add up to 1 s).
// (a') The same with the small messages only (CTD and optode), against the no-op subscriber on those.
// (b') Baseline of (b): the no-op subscriber's own publish -> receive latency at the first rate.
// (c) Event-loop stall seen from outside: /healthz is requested every 50 ms throughout (a) and (b); the
//     longest answer is reported (a stalled event loop answers late). (c') The daemon's own gauge
//     reefd_event_loop_stall_max_seconds, scraped about every second, worst value.
// REEFD_PROCESSOR_WORKER=1 runs the daemon with its processor in a worker thread (the rows say so).
// REEFD_BENCH_DAEMON_PROF=DIR writes a CPU profile of the daemon in phase (a) to DIR.
// Goals (issue 17): daemon >= 0.7 of the no-op subscriber's rate on both mixes; p99 < 1 s at 5,000 msg/s;
// longest /healthz answer < 250 ms.
import { createServer, type IncomingMessage } from 'node:http';
import { mkdtempSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import mqtt, { type MqttClient } from 'mqtt';
import { simulateMessages } from '../../libs/simulator/index.js';
import { MQTT_URL, VM_URL, randomSuffix, requireService } from '../integration/env.js';
import { parsed, replicatedDemo } from '../e2e/helpers/big-site.js';
import { startReefd, writeConfig, type RunningReefd } from '../e2e/helpers/reefd.js';
import { summaryRow } from './lib/measure.js';

const copies = Number(process.env.REEFD_BENCH_DAEMON_COPIES ?? 4);
const throughputN = Number(process.env.REEFD_BENCH_DAEMON_N ?? 30_000);
const rates = (process.env.REEFD_BENCH_DAEMON_RATES ?? '5000,3000,2000,1500,1000,500').split(',').map(Number);
const firstSeconds = Number(process.env.REEFD_BENCH_DAEMON_SECONDS ?? 20);
const laterSeconds = 10;
const HOUR = 3_600_000;
/** Which processor the daemon runs (REEFD_PROCESSOR_WORKER=1 puts it in a worker thread), for the row labels. */
const worker = process.env.REEFD_PROCESSOR_WORKER === '1' ? ' (processor in a worker thread)' : '';

await requireService('Mosquitto', MQTT_URL);
await requireService('VictoriaMetrics', VM_URL);

// Messages: enough for the largest fixed-rate step, simulated over the days before now (timing QC).
const need = Math.max(throughputN, (rates[0] ?? 0) * firstSeconds);
const perCopyHour = 204; // demo site: ~815 messages per 4 h (libs/simulator CADENCE_S)
const hours = Math.ceil(need / (copies * perCopyHour) + 2);
const baseCfg = replicatedDemo(copies);
const site0 = String(baseCfg.site);
let t = performance.now();
const startMs = Math.floor((Date.now() - (hours + 2) * HOUR) / 60_000) * 60_000;
const sim = simulateMessages(parsed(baseCfg), { startMs, durationMs: hours * HOUR, seed: 5 });
// Topic without its prefix and site: each run puts its own in front.
const msgs = sim.messages.slice(0, need).map((m) => {
  const parts = m.topic.split('/');
  return {
    rest: parts.slice(2).join('/'),
    station: parts[2] ?? '',
    kind: parts[3] ?? '',
    tMs: Date.parse(String(m.payload.t)),
    payload: JSON.stringify(m.payload),
  };
});
console.log(
  `messages: ${msgs.length} (${copies} copies of the demo site, ${hours} simulated h), simulated in ` +
    `${((performance.now() - t) / 1000).toFixed(1)} s`,
);

const connect = (id: string, clean = true): Promise<MqttClient> =>
  mqtt.connectAsync(MQTT_URL, { clientId: id, protocolVersion: 5, clean, reconnectPeriod: 0 });

/** Publishes `list` at QoS 1, at most `window` unacknowledged; `ratePerS` paces it (0 = as fast as it goes). */
async function publish(
  client: MqttClient,
  topicOf: (i: number) => string,
  list: typeof msgs,
  ratePerS: number,
  window = 1000,
  onSent?: (i: number, atMs: number) => void,
): Promise<void> {
  let inflight = 0;
  let wake: (() => void) | undefined;
  const t0 = performance.now();
  for (let i = 0; i < list.length; i++) {
    if (ratePerS > 0) {
      const due = t0 + (i / ratePerS) * 1000;
      const now = performance.now();
      if (due - now > 2) await new Promise((r) => setTimeout(r, due - now));
    }
    while (inflight >= window) await new Promise<void>((r) => (wake = r));
    inflight++;
    onSent?.(i, performance.timeOrigin + performance.now());
    client.publish(topicOf(i), (list[i] as (typeof msgs)[number]).payload, { qos: 1 }, () => {
      inflight--;
      const w = wake;
      wake = undefined;
      w?.();
    });
  }
  while (inflight > 0) await new Promise<void>((r) => (wake = r));
}

function config(prefix: string, site: string, dataDir: string, influx: Record<string, unknown>): string {
  return writeConfig(path.join(dataDir, '..', `${prefix}.yaml`), {
    ...baseCfg,
    site,
    topic_prefix: prefix,
    data_dir: dataDir,
    http: { port: 0 },
    sources: { mqtt: { url: MQTT_URL, client_id: `reefd-bench-${prefix}` } },
    outputs: { influx },
  });
}

const dir = mkdtempSync(path.join(tmpdir(), 'reefd-bench-daemon-'));
const list = msgs.slice(0, throughputN);

// (a1) Baseline: a no-op subscriber on the same broker.
async function noOpRate(list: typeof msgs): Promise<number> {
  const prefix = `bench-${randomSuffix()}`;
  const sub = await connect(`bench-sub-${prefix}`);
  let got = 0;
  let last = 0;
  let done: () => void = () => {};
  const all = new Promise<void>((r) => (done = r));
  sub.on('message', () => {
    last = performance.now();
    if (++got === list.length) done();
  });
  await sub.subscribeAsync(`${prefix}/#`, { qos: 1 });
  const pub = await connect(`bench-pub-${prefix}`);
  const t0 = performance.now();
  await publish(pub, (i) => `${prefix}/${site0}/${(list[i] as (typeof msgs)[number]).rest}`, list, 0);
  await Promise.race([all, new Promise((r) => setTimeout(r, 120_000))]);
  await pub.endAsync();
  await sub.endAsync();
  if (got !== list.length) console.log(`  no-op subscriber received ${got} of ${list.length}`);
  return (got / (last - t0)) * 1000;
}

async function waitCount(
  d: RunningReefd,
  n: number,
  limitMs: number,
): Promise<{ count: number; atMs: number }> {
  const deadline = performance.now() + limitMs;
  let count = 0;
  for (;;) {
    try {
      count = await d.counter('reefd_messages_in_total');
    } catch (err) {
      // A daemon too busy to read a request within its keep-alive timeout (5 s) closes the connection
      // under it (ECONNRESET): poll again on a new one, unless the daemon is gone.
      if (d.child.exitCode !== null || d.child.signalCode !== null)
        throw new Error(`REEFD_BENCH_DAEMON_EXITED: ${String(d.child.exitCode ?? d.child.signalCode)}`, {
          cause: err,
        });
      console.log(
        `    (a /metrics poll failed: ${(err as Error).cause ?? (err as Error).message}; polling again)`,
      );
    }
    if (count >= n || performance.now() > deadline) return { count, atMs: performance.now() };
    await new Promise((r) => setTimeout(r, 100));
  }
}

// (a2) The daemon, into the real VictoriaMetrics.
async function daemonRate(list: typeof msgs): Promise<{ rate: number; count: number; stallMs: number }> {
  const prefix = `bench-${randomSuffix()}`;
  const site = `bench-${randomSuffix()}`;
  const dataDir = path.join(dir, prefix);
  const prof = process.env.REEFD_BENCH_DAEMON_PROF;
  const d = await startReefd(
    config(prefix, site, dataDir, { url: VM_URL, api: 'v2', bucket: `reefd_bench_${prefix}` }),
    [],
    prof ? ['--cpu-prof', `--cpu-prof-dir=${prof}`] : [],
  );
  try {
    await waitReady(d);
    const probe = watchHealth(d);
    const pub = await connect(`bench-pub-${prefix}`);
    const t0 = performance.now();
    await publish(pub, (i) => `${prefix}/${site}/${(list[i] as (typeof msgs)[number]).rest}`, list, 0);
    const r = await waitCount(d, list.length, 300_000);
    await pub.endAsync();
    return { rate: (r.count / (r.atMs - t0)) * 1000, count: r.count, stallMs: await probe.stop() };
  } finally {
    await d.stop(30_000);
  }
}

/** Longest event-loop stall the daemon itself reported on /metrics during the run, ms. */
let insideWorstMs = 0;

/** The daemon's own gauge of its longest stall since the previous scrape, ms (NaN if not there). */
async function scrapeStallMs(d: RunningReefd): Promise<number> {
  const text = await (await fetch(`${d.url}/metrics`)).text();
  const line = text.split('\n').find((l) => l.startsWith('reefd_event_loop_stall_max_seconds '));
  return line === undefined ? Number.NaN : Number(line.split(' ')[1]) * 1000;
}

/**
 * Requests /healthz every 50 ms (one at a time) until stopped; resolves with the longest answer, ms. Every
 * 20th round also scrapes /metrics for the daemon's own longest stall (insideWorstMs).
 */
function watchHealth(d: RunningReefd): { stop: () => Promise<number> } {
  let worst = 0;
  let running = true;
  const loop = (async () => {
    for (let round = 0; running; round++) {
      const t = performance.now();
      try {
        await (await fetch(`${d.url}/healthz`)).arrayBuffer();
        if (round % 20 === 0) {
          const inside = await scrapeStallMs(d);
          if (inside > insideWorstMs) insideWorstMs = inside;
        }
      } catch {
        // a refused request during shutdown is not a stall
      }
      worst = Math.max(worst, performance.now() - t);
      await new Promise((r) => setTimeout(r, 50));
    }
  })();
  return {
    stop: async () => {
      running = false;
      await loop;
      return worst;
    },
  };
}

async function waitReady(d: RunningReefd): Promise<void> {
  for (let i = 0; i < 300; i++) {
    if ((await fetch(`${d.url}/readyz`)).ok) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('REEFD_BENCH_NOT_READY: the daemon did not connect to the broker in 30 s');
}

// (b) Latency through a local receiver posing as the database.
async function body(req: IncomingMessage): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const c of req) chunks.push(c as Buffer);
  const buf = Buffer.concat(chunks);
  return (req.headers['content-encoding'] === 'gzip' ? gunzipSync(buf) : buf).toString('utf8');
}

interface Step {
  rate: number;
  seconds: number;
  sent: number;
  processed: number;
  drainS: number;
  matched: number;
  p50: number;
  p99: number;
  max: number;
  /** Without the first fifth of the step (JIT warm-up, the first batches). */
  steadyP50: number;
  steadyP99: number;
  stallMs: number;
}

async function latencyStep(rate: number, seconds: number): Promise<Step> {
  const n = Math.min(msgs.length, Math.round(rate * seconds));
  const part = msgs.slice(0, n);
  const arrivals = new Map<string, number>();
  const server = createServer((req, res) => {
    void body(req).then((text) => {
      const at = performance.timeOrigin + performance.now();
      for (const line of text.split('\n')) {
        if (!line.startsWith('oxygen,')) continue;
        const station = /(?:^|,)station=([^, ]+)/.exec(line)?.[1];
        const ts = line.slice(line.lastIndexOf(' ') + 1);
        if (station !== undefined) arrivals.set(`${station}|${ts}`, at);
      }
      res.writeHead(204).end();
    });
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const port = (server.address() as AddressInfo).port;
  const prefix = `bench-${randomSuffix()}`;
  const site = `bench-${randomSuffix()}`;
  const dataDir = path.join(dir, prefix);
  const d = await startReefd(
    config(prefix, site, dataDir, { url: `http://127.0.0.1:${port}`, api: 'v2', flush_ms: 100 }),
  );
  const sentAt = new Map<string, number>();
  try {
    await waitReady(d);
    const probe = watchHealth(d);
    const pub = await connect(`bench-pub-${prefix}`);
    const t0 = performance.now();
    await publish(
      pub,
      (i) => `${prefix}/${site}/${(part[i] as (typeof msgs)[number]).rest}`,
      part,
      rate,
      5000,
      (i, at) => {
        const m = part[i] as (typeof msgs)[number];
        if (m.kind === 'oxygen') sentAt.set(`${m.station}|${m.tMs}`, at);
      },
    );
    const published = performance.now();
    const r = await waitCount(d, n, 120_000);
    await new Promise((res) => setTimeout(res, 500)); // the last batch to the receiver
    await pub.endAsync();
    const lat: number[] = [];
    const steady: number[] = [];
    const warm = t0 + performance.timeOrigin + seconds * 200; // after the first fifth of the step
    for (const [k, at] of sentAt) {
      const got = arrivals.get(k);
      if (got === undefined) continue;
      lat.push(got - at);
      if (at > warm) steady.push(got - at);
    }
    lat.sort((a, b) => a - b);
    steady.sort((a, b) => a - b);
    const q = (p: number, xs = lat) => xs[Math.min(xs.length - 1, Math.floor(p * xs.length))] ?? NaN;
    return {
      rate,
      seconds,
      sent: n,
      processed: r.count,
      drainS: (r.atMs - published) / 1000,
      matched: lat.length,
      p50: q(0.5),
      p99: q(0.99),
      max: lat[lat.length - 1] ?? NaN,
      steadyP50: q(0.5, steady),
      steadyP99: q(0.99, steady),
      stallMs: await probe.stop(),
    };
  } finally {
    await d.stop(30_000);
    server.close();
  }
}

/** (b') The no-op subscriber's publish -> receive latency at a fixed rate (its p99, ms). */
async function noOpLatency(rate: number, seconds: number): Promise<number> {
  const n = Math.min(msgs.length, Math.round(rate * seconds));
  const part = msgs.slice(0, n);
  const prefix = `bench-${randomSuffix()}`;
  const sub = await connect(`bench-sub-${prefix}`);
  const sentAt = new Float64Array(n);
  const lat: number[] = [];
  sub.on('message', (topic: string) => {
    const i = Number(topic.slice(topic.lastIndexOf('/') + 1));
    lat.push(performance.timeOrigin + performance.now() - (sentAt[i] ?? 0));
  });
  await sub.subscribeAsync(`${prefix}/#`, { qos: 1 });
  const pub = await connect(`bench-pub-${prefix}`);
  await publish(
    pub,
    (i) => `${prefix}/${i}`,
    part,
    rate,
    5000,
    (i, at) => (sentAt[i] = at),
  );
  for (let i = 0; i < 100 && lat.length < n; i++) await new Promise((r) => setTimeout(r, 100));
  await pub.endAsync();
  await sub.endAsync();
  lat.sort((a, b) => a - b);
  return lat[Math.min(lat.length - 1, Math.floor(0.99 * lat.length))] ?? NaN;
}

t = performance.now();
const small = msgs.filter((m) => m.kind === 'ctd' || m.kind === 'oxygen').slice(0, throughputN);
const base = await noOpRate(list);
console.log(
  `(a) no-op mqtt.js subscriber (baseline):  ${Math.round(base)} msg/s (${list.length} messages, QoS 1)`,
);
const dm = await daemonRate(list);
console.log(
  `    reefd run (Mosquitto -> VictoriaMetrics): ${Math.round(dm.rate)} msg/s (${dm.count} processed)`,
);
console.log(
  `    ratio daemon / no-op subscriber: ${(dm.rate / base).toFixed(3)} (goal >= 0.70: ${dm.rate / base >= 0.7 ? 'met' : 'NOT met'})`,
);
const baseSmall = await noOpRate(small);
const dmSmall = await daemonRate(small);
console.log(
  `(a') small messages (CTD, optode; ${small.length}): no-op subscriber ${Math.round(baseSmall)} msg/s, ` +
    `reefd run ${Math.round(dmSmall.rate)} msg/s, ratio ${(dmSmall.rate / baseSmall).toFixed(3)}`,
);

let sustained: Step | undefined;
let first: Step | undefined;
for (const [i, rate] of rates.entries()) {
  const s = await latencyStep(rate, i === 0 ? firstSeconds : laterSeconds);
  first ??= s;
  // Sustained: every message processed, the backlog gone within 1 s of the last publish, and no queue
  // building up (p99 after the first fifth under 1 s).
  const ok = s.processed >= s.sent && s.drainS < 1 && s.steadyP99 < 1000;
  console.log(
    `(b) ${rate} msg/s for ${s.seconds} s: ${s.processed}/${s.sent} processed, backlog drained ` +
      `${s.drainS.toFixed(1)} s after the last publish; latency publish -> database write (${s.matched} oxygen ` +
      `points): p50 ${Math.round(s.p50)} ms, p99 ${Math.round(s.p99)} ms, max ${Math.round(s.max)} ms; ` +
      `after the first fifth: p50 ${Math.round(s.steadyP50)} ms, p99 ${Math.round(s.steadyP99)} ms; ` +
      `${ok ? 'sustained' : 'NOT sustained'}; longest /healthz ${Math.round(s.stallMs)} ms`,
  );
  console.log(
    `    ratio p99 / 1 s goal: ${(s.p99 / 1000).toFixed(2)}; ratio rate / no-op subscriber rate: ${(rate / base).toFixed(3)}`,
  );
  if (ok) {
    sustained = s;
    break;
  }
}
console.log(
  sustained
    ? `highest sustained fixed rate tried: ${sustained.rate} msg/s (p99 ${Math.round(sustained.p99)} ms)`
    : `no fixed rate of ${rates.join(', ')} msg/s was sustained`,
);
const firstRate = rates[0] ?? 5000;
const baseP99 = await noOpLatency(firstRate, laterSeconds);
console.log(`(b') no-op subscriber at ${firstRate} msg/s: p99 publish -> receive ${baseP99.toFixed(1)} ms`);
const stall = Math.max(dm.stallMs, dmSmall.stallMs, first?.stallMs ?? 0, sustained?.stallMs ?? 0);
console.log(`(c) longest /healthz answer during (a) and (b): ${Math.round(stall)} ms`);
console.log(
  `(c') longest stall the daemon reported (reefd_event_loop_stall_max_seconds): ${Math.round(insideWorstMs)} ms`,
);
console.log(`total ${((performance.now() - t) / 1000).toFixed(0)} s`);

summaryRow({
  id: 'intake',
  what: `daemon intake / no-op mqtt.js subscriber, demo mix with bursts${worker}`,
  baseline: `${Math.round(base)} msg/s`,
  measured: `${Math.round(dm.rate)} msg/s`,
  ratio: dm.rate / base,
  goal: '>= 0.7',
  met: dm.rate / base >= 0.7,
});
summaryRow({
  id: 'intake-small',
  what: `daemon intake / no-op mqtt.js subscriber, small CTD/O2 messages${worker}`,
  baseline: `${Math.round(baseSmall)} msg/s`,
  measured: `${Math.round(dmSmall.rate)} msg/s`,
  ratio: dmSmall.rate / baseSmall,
  goal: '>= 0.7',
  met: dmSmall.rate / baseSmall >= 0.7,
});
if (first !== undefined)
  summaryRow({
    id: 'latency',
    what: `p99 record latency at ${first.rate} msg/s sustained (publish -> database write)${worker}`,
    baseline: `no-op subscriber p99 ${baseP99.toFixed(0)} ms`,
    measured: `${Math.round(first.p99)} ms (${first.processed}/${first.sent} processed, drained ${first.drainS.toFixed(1)} s after)`,
    ratio: first.p99 / baseP99,
    goal: '< 1 s',
    met: first.p99 < 1000 && first.processed >= first.sent,
  });
summaryRow({
  id: 'stall',
  what: `event-loop stall: longest /healthz answer seen from outside under load${worker}`,
  baseline: 'goal 250 ms',
  measured: `${Math.round(stall)} ms`,
  ratio: stall / 250,
  goal: '< 250 ms outside',
  met: stall < 250,
});
summaryRow({
  id: 'stall-inside',
  what: `event-loop stall in-process: the daemon's reefd_event_loop_stall_max_seconds under load${worker}`,
  baseline: 'goal 100 ms',
  measured: `${Math.round(insideWorstMs)} ms`,
  ratio: insideWorstMs / 100,
  goal: '< 100 ms in-process',
  met: insideWorstMs < 100,
});
