// Benchmark: shore throughput (raw messages/s) through the Kafka consumer group with 1 and 2 member
// processes on this machine, against the bare processor on the same messages in this process (the
// baseline, one core), all measured in the same run. Messages: two fictional sites from the demo reef
// (libs/simulator), produced through the edge bridge with the site partitioner onto a 2-partition topic.
// Run: npx tsx test/bench/scaleout.bench.ts [HOURS] (default 12 h of data per site). Needs Kafka at
// REEFD_TEST_KAFKA_BROKERS (default 127.0.0.1:19092). The capacity estimate is in deploy/SCALING.md.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { Kafka, logLevel } from 'kafkajs';
import pino from 'pino';
import { parseMessage, type ReefdConfig } from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor } from '../../libs/processor/index.js';
import { rawRecordOf } from '../../services/scaleout/edge-bridge.js';
import { KAFKA_BROKERS, randomSuffix } from '../integration/env.js';
import { deployment, produceViaEdge, twoSites } from '../integration/scaleout/fixtures.js';

const HOURS = Number(process.argv[2] ?? 12);
const ROOT = path.resolve(import.meta.dirname, '../..');
const START_MS = Date.UTC(2026, 10, 20);
const logger = pino({ level: 'silent' });

interface Status {
  t: number;
  cpuMs: number;
  assigned: number[];
  positions: Record<string, string>;
}

class Child {
  readonly proc: ChildProcess;
  last: Status | undefined;
  constructor(args: string[]) {
    this.proc = spawn(
      process.execPath,
      ['--import', 'tsx', path.join(ROOT, 'services/scaleout/shore-main.ts'), ...args],
      { stdio: ['pipe', 'pipe', 'inherit'], cwd: ROOT },
    );
    const stdout = this.proc.stdout;
    if (stdout === null) throw new Error('no stdout');
    createInterface({ input: stdout }).on('line', (l) => {
      try {
        this.last = JSON.parse(l) as Status;
      } catch {
        // not a status line
      }
    });
  }
  go(): void {
    this.proc.stdin?.write('go\n');
  }
  async stop(): Promise<void> {
    const done = new Promise((r) => this.proc.once('exit', r));
    this.proc.kill('SIGTERM');
    await done;
  }
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

async function until(what: string, ok: () => boolean, timeoutMs = 120_000): Promise<number> {
  const end = Date.now() + timeoutMs;
  while (!ok()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(5);
  }
  return Date.now();
}

async function siteFiles(sites: readonly ReefdConfig[], dir: string): Promise<string[]> {
  const demo = await readFile(path.join(ROOT, 'deploy/demo/ornen-reef.yaml'), 'utf8');
  return Promise.all(
    sites.map(async (s) => {
      const f = path.join(dir, `${s.site}.yaml`);
      await writeFile(f, demo.replace(/^site: .*$/m, `site: ${s.site}`));
      return f;
    }),
  );
}

/** Messages/s through `members` shore processes in one group, from "go" until every partition is drained. */
async function groupRate(
  members: number,
  topic: string,
  files: string[],
  hw: Map<number, bigint>,
  total: number,
): Promise<{ rate: number; cpuMsPerMsg: number }> {
  const group = `reefd-bench-${randomSuffix()}`;
  const stateDir = await mkdtemp(path.join(tmpdir(), 'reefd-bench-state-'));
  const args = ['--brokers', KAFKA_BROKERS.join(','), '--topic', topic, '--group', group];
  args.push(
    '--state-dir',
    stateDir,
    '--snapshot-ms',
    '10000',
    '--hold',
    ...files.flatMap((f) => ['--site', f]),
  );
  const kids = Array.from({ length: members }, () => new Child(args));
  try {
    // Wait for a settled group: every partition assigned to exactly one member, stable for 1 s.
    let stableSince = 0;
    await until('a settled group', () => {
      const owned = kids.flatMap((k) => k.last?.assigned ?? []);
      const ok = owned.length === hw.size && kids.every((k) => (k.last?.assigned.length ?? 0) > 0);
      if (!ok) stableSince = 0;
      else if (stableSince === 0) stableSince = Date.now();
      return ok && Date.now() - stableSince > 1000;
    });
    const t0 = Date.now();
    const cpu0 = kids.reduce((a, k) => a + (k.last?.cpuMs ?? 0), 0);
    for (const k of kids) k.go();
    const t1 = await until('drained', () =>
      [...hw].every(([p, end]) => kids.some((k) => k.last?.positions[String(p)] === end.toString())),
    );
    await sleep(150); // one more status line, for the CPU time at the end
    const cpu1 = kids.reduce((a, k) => a + (k.last?.cpuMs ?? 0), 0);
    return { rate: total / ((t1 - t0) / 1000), cpuMsPerMsg: (cpu1 - cpu0) / total };
  } finally {
    await Promise.all(kids.map((k) => k.stop()));
  }
}

const sites = await twoSites(2);
const msgs = deployment(sites, START_MS, HOURS * 3600_000);

// Baseline: the bare processor, one core, same messages from their wire text (parse + validate + check +
// push: the shore's work without Kafka).
const procs = new Map(sites.map((c) => [c.site, { cfg: c, p: createProcessor(c) }]));
const wire = msgs.map((m) => {
  const { message: x } = m;
  return {
    topic: `reef/${x.site}/${x.station}/${x.kind}/${x.sensor}`,
    text: rawRecordOf(x).value,
    rxMs: m.rxMs,
  };
});
let t = performance.now();
const cpuBare0 = process.cpuUsage();
for (const w of wire) {
  const r = parseMessage(w.topic, w.text, 'reef');
  const s = r.ok ? procs.get(r.message.site) : undefined;
  if (!r.ok || s === undefined || checkAgainstConfig(s.cfg, r.message) !== undefined) continue;
  s.p.push(r.message, w.rxMs);
}
const bare = msgs.length / ((performance.now() - t) / 1000);
const cpuBare = process.cpuUsage(cpuBare0);
const bareCpuMs = (cpuBare.user + cpuBare.system) / 1000 / msgs.length;

const kafka = new Kafka({ clientId: 'reefd-bench', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });
const admin = kafka.admin();
await admin.connect();
const topic = `reefd-bench-${randomSuffix()}`;
await admin.createTopics({ topics: [{ topic, numPartitions: 2 }], waitForLeaders: true });
t = performance.now();
await produceViaEdge(KAFKA_BROKERS, topic, msgs, logger);
const edgeRate = msgs.length / ((performance.now() - t) / 1000);
const hw = new Map((await admin.fetchTopicOffsets(topic)).map((o) => [o.partition, BigInt(o.high)] as const));
const files = await siteFiles(sites, await mkdtemp(path.join(tmpdir(), 'reefd-bench-sites-')));

const one = await groupRate(1, topic, files, hw, msgs.length);
const two = await groupRate(2, topic, files, hw, msgs.length);
await admin.deleteTopics({ topics: [topic] }).catch(() => undefined);
await admin.disconnect();

const f = (x: number) => x.toFixed(0).padStart(8);
const ms = (x: number) => x.toFixed(3);
const bytes = msgs.reduce((a, m) => a + JSON.stringify(m.message).length, 0);
const load = (await import('node:os')).loadavg()[0] ?? 0;
console.log(
  `scale-out: ${msgs.length} messages (${HOURS} h x 2 sites, mean ${(bytes / msgs.length).toFixed(0)} B), 2 partitions, load ${load.toFixed(1)} on ${(await import('node:os')).cpus().length} cores`,
);
console.log(`  bare processor, this process (baseline) ${f(bare)} msg/s  cpu ${ms(bareCpuMs)} ms/msg`);
console.log(
  `  edge bridge produce (gzip, acks=all)    ${f(edgeRate)} msg/s  ${(edgeRate / bare).toFixed(2)}x baseline`,
);
console.log(
  `  shore, 1 member process                 ${f(one.rate)} msg/s  ${(one.rate / bare).toFixed(2)}x baseline, cpu ${ms(one.cpuMsPerMsg)} ms/msg = ${(one.cpuMsPerMsg / bareCpuMs).toFixed(2)}x baseline`,
);
console.log(
  `  shore, 2 member processes               ${f(two.rate)} msg/s  ${(two.rate / bare).toFixed(2)}x baseline, cpu ${ms(two.cpuMsPerMsg)} ms/msg = ${(two.cpuMsPerMsg / bareCpuMs).toFixed(2)}x baseline`,
);
console.log(`  2 members / 1 member (wall-clock rate)  ${(two.rate / one.rate).toFixed(2)}x`);
