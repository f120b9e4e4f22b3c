// Scale-out with a real crash: two shore member processes (services/scaleout/shore-main.ts) in one group;
// one is killed with SIGKILL mid-stream, so it neither stores state nor commits nor leaves the group; after
// the session timeout the other takes its partition over from the compacted state topic. The records both wrote
// (de-duplicated) equal those of a single in-process member over the same topic.
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { Kafka, logLevel } from 'kafkajs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { createKafkaStateStore } from '../../../services/scaleout/kafka-state-store.js';
import { partitionOfSite } from '../../../services/scaleout/partition.js';
import { createShoreMember } from '../../../services/scaleout/shore.js';
import { createDirectoryStateStore } from '../../../services/scaleout/state-store.js';
import { KAFKA_BROKERS, itTopic, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from '../io/fixtures.js';
import { byId, deployment, produceViaEdge, twoSites } from './fixtures.js';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const START_MS = Date.UTC(2026, 10, 21, 0, 0, 0);
const kafka = new Kafka({ clientId: 'reefd-it', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
});

interface Status {
  assigned: number[];
  positions: Record<string, string>;
}

class MemberProcess {
  readonly proc: ChildProcess;
  last: Status | undefined;
  exited = false;
  constructor(args: string[]) {
    this.proc = spawn(
      process.execPath,
      ['--import', 'tsx', path.join(ROOT, 'services/scaleout/shore-main.ts'), ...args],
      { stdio: ['pipe', 'pipe', 'ignore'], cwd: ROOT },
    );
    this.proc.once('exit', () => (this.exited = true));
    if (this.proc.stdout)
      createInterface({ input: this.proc.stdout }).on('line', (l) => {
        try {
          this.last = JSON.parse(l) as Status;
        } catch {
          // not a status line
        }
      });
  }
  position(p: number): bigint {
    return BigInt(this.last?.positions[String(p)] ?? '0');
  }
  async signal(sig: NodeJS.Signals): Promise<void> {
    if (this.exited) return;
    const done = new Promise((r) => this.proc.once('exit', r));
    this.proc.kill(sig);
    await done;
  }
}

async function readRecords(file: string): Promise<DerivedRecord[]> {
  if (!existsSync(file)) return [];
  const text = await readFile(file, 'utf8');
  return text
    .split('\n')
    .filter((l) => l !== '')
    .map((l) => JSON.parse(l) as DerivedRecord);
}

describe('scale-out: a member process killed with SIGKILL', () => {
  it('the survivor takes over after the session timeout and the records equal one member', async () => {
    const sites = await twoSites(2);
    const topic = itTopic();
    const admin = kafka.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 2 }], waitForLeaders: true });
    const msgs = deployment(sites, START_MS, 6 * 3600_000);
    await produceViaEdge(KAFKA_BROKERS, topic, msgs, quietLogger());
    const hw = new Map(
      (await admin.fetchTopicOffsets(topic)).map((o) => [o.partition, BigInt(o.high)] as const),
    );
    await admin.disconnect();

    // Reference: one in-process member.
    const ref: DerivedRecord[] = [];
    const one = createShoreMember({
      sites,
      brokers: KAFKA_BROKERS,
      clientId: 'reefd-it-shore',
      groupId: `reefd-it-${randomSuffix()}`,
      topic,
      store: createDirectoryStateStore(await mkdtemp(path.join(tmpdir(), 'reefd-k9-ref-'))),
      onRecords: (r) => ref.push(...r),
      logger: quietLogger(),
    });
    await one.start();
    await pollUntil(
      'reference drained',
      async () => ([...hw].every(([p, end]) => one.positions().get(p) === end) ? true : undefined),
      40_000,
    );
    await one.stop();

    // Two member processes, held until the group has settled on one partition each.
    const dir = await mkdtemp(path.join(tmpdir(), 'reefd-k9-'));
    const files = await Promise.all(
      sites.map(async (s) => {
        const f = path.join(dir, `${s.site}.yaml`);
        const demo = await readFile(path.join(ROOT, 'deploy/demo/ornen-reef.yaml'), 'utf8');
        await writeFile(f, demo.replace(/^site: .*$/m, `site: ${s.site}`));
        return f;
      }),
    );
    const group = `reefd-it-${randomSuffix()}`;
    const common = ['--brokers', KAFKA_BROKERS.join(','), '--topic', topic, '--group', group];
    common.push('--state-topic', `${topic}.state`, '--snapshot-ms', '200', '--hold');
    common.push(...files.flatMap((f) => ['--site', f]));
    const outA = path.join(dir, 'a.ndjson');
    const outB = path.join(dir, 'b.ndjson');
    let storedOffset = 0n;
    const a = new MemberProcess([...common, '--out', outA]);
    const b = new MemberProcess([...common, '--out', outB]);
    try {
      await pollUntil(
        'one partition each',
        async () => (a.last?.assigned.length === 1 && b.last?.assigned.length === 1 ? true : undefined),
        40_000,
      );
      a.proc.stdin?.write('go\n');
      b.proc.stdin?.write('go\n');
      const pa = a.last?.assigned[0] ?? -1;
      const end = hw.get(pa) ?? 0n;
      await pollUntil(
        'a a third through its partition',
        async () => (a.position(pa) * 3n >= end ? true : undefined),
        40_000,
      );
      await a.signal('SIGKILL');
      const killedAt = a.position(pa);
      expect(killedAt < end).toBe(true); // killed mid-stream, not after the end
      // What a stored part-way: the entry b will restore (read before the session timeout lets b in).
      const siteA = sites.find((s) => partitionOfSite(s.site, 2) === pa)?.site ?? '';
      const reader = await createKafkaStateStore({
        brokers: KAFKA_BROKERS,
        clientId: 'reefd-it-reader',
        topic: `${topic}.state`,
        logger: quietLogger(),
      });
      const entry = await reader.load(siteA);
      await reader.close();
      storedOffset = BigInt(entry?.offset ?? '0');
      expect(storedOffset > 0n && storedOffset <= killedAt).toBe(true);

      await pollUntil(
        'b drained both partitions',
        async () => ([...hw].every(([p, e]) => b.position(p) === e) ? true : undefined),
        60_000,
        200,
      );
      await b.signal('SIGTERM');
    } finally {
      await Promise.all([a.signal('SIGKILL'), b.signal('SIGKILL')]);
    }

    const got = byId([...(await readRecords(outA)), ...(await readRecords(outB))]);
    const want = byId(ref);
    expect(want.map.size).toBeGreaterThan(300);
    expect(got.conflicts).toEqual([]);
    expect([...got.map.keys()].sort()).toEqual([...want.map.keys()].sort());
    for (const [id, json] of want.map) expect(got.map.get(id), id).toBe(json);
    // a's records reach at least as far as its stored state (flushed before each store).
    expect(storedOffset > 0n).toBe(true);
  }, 120_000);
});
