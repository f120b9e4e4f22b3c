// Scale-out over the real broker: the edge bridge produces two fictional sites (site partitioner, two
// partitions); a single shore member gives the reference records; then two members share the group,
// one is killed mid-stream without storing state or committing, the other takes its partition over from
// the state store, and the de-duplicated derived records equal the single member's.
import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { ConfigResourceTypes, Kafka, logLevel } from 'kafkajs';
import { beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord, ReefdConfig } from '../../../libs/contract/index.js';
import { createShoreMember, type ShoreMember } from '../../../services/scaleout/shore.js';
import { createKafkaStateStore, type KafkaStateStore } from '../../../services/scaleout/kafka-state-store.js';
import { createDirectoryStateStore, type SiteStateStore } from '../../../services/scaleout/state-store.js';
import { KAFKA_BROKERS, itTopic, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from '../io/fixtures.js';
import { byId, deployment, produceViaEdge, twoSites } from './fixtures.js';

const PARTITIONS = 2;
const START_MS = Date.UTC(2026, 10, 20, 0, 0, 0);
const kafka = new Kafka({ clientId: 'reefd-it', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
});

function member(
  sites: readonly ReefdConfig[],
  topic: string,
  groupId: string,
  store: SiteStateStore,
  out: DerivedRecord[],
  pace?: Parameters<typeof createShoreMember>[0]['pace'],
): ShoreMember {
  return createShoreMember({
    sites,
    brokers: KAFKA_BROKERS,
    clientId: 'reefd-it-shore',
    groupId,
    topic,
    store,
    snapshotEveryMs: 200,
    maxBytesPerPartition: 64 * 1024,
    // Both members and the broker share a loaded CI machine: a generous session keeps a late heartbeat
    // from rebalancing the group under the test (the kill below is what should move a partition).
    sessionTimeoutMs: 30_000,
    onRecords: (records) => out.push(...records),
    logger: quietLogger(),
    ...(pace !== undefined ? { pace } : {}),
  });
}

/** Resolves when the member has processed every partition up to its high watermark. */
async function drained(m: ShoreMember, hw: ReadonlyMap<number, bigint>, what: string): Promise<void> {
  await pollUntil(
    what,
    async () => {
      const pos = m.positions();
      return [...hw].every(([p, end]) => end === 0n || pos.get(p) === end) ? true : undefined;
    },
    40_000,
  );
}

describe('scale-out: edge bridge and shore consumer group', () => {
  it.each([
    ['a shared directory', 'dir'],
    ['a compacted Kafka topic', 'kafka'],
  ] as const)(
    'two members, one killed mid-stream, state in %s: the survivor resumes its windows and the records equal one member',
    async (_label, kind) => {
      const sites = await twoSites(PARTITIONS);
      const topic = itTopic();
      const admin = kafka.admin();
      await admin.connect();
      await admin.createTopics({ topics: [{ topic, numPartitions: PARTITIONS }], waitForLeaders: true });
      const msgs = deployment(sites, START_MS, 3 * 3600_000);
      await produceViaEdge(KAFKA_BROKERS, topic, msgs, quietLogger());
      const hw = new Map(
        (await admin.fetchTopicOffsets(topic)).map((o) => [o.partition, BigInt(o.high)] as const),
      );
      await admin.disconnect();
      // Every site on one partition, both partitions used (the site partitioner).
      expect([...hw.values()].reduce((a, b) => a + b, 0n)).toBe(BigInt(msgs.length));
      expect([...hw.values()].every((n) => n > 100n)).toBe(true);

      // 1. The reference: one member alone.
      const single: DerivedRecord[] = [];
      const one = member(
        sites,
        topic,
        `reefd-it-${randomSuffix()}`,
        createDirectoryStateStore(await tmp()),
        single,
      );
      await one.start();
      await drained(one, hw, 'single member drained the topic');
      await one.stop();
      const ref = byId(single);
      expect(ref.dups).toBe(0);
      // The demo site derives every record type over 3 h (waves, currents, carbonate, oxygen, fluxes).
      const types = new Set(single.map((r) => r.type));
      for (const t of ['waves', 'current', 'carbonate', 'oxygen', 'flux']) expect(types).toContain(t);

      // 2. Two members in one group; member a is held at half of its partition and killed there.
      const group = `reefd-it-${randomSuffix()}`;
      const stateDir = await tmp();
      const kafkaStores: KafkaStateStore[] = [];
      const store = async (): Promise<SiteStateStore> => {
        if (kind === 'dir') return createDirectoryStateStore(stateDir);
        const k = await createKafkaStateStore({
          brokers: KAFKA_BROKERS,
          clientId: 'reefd-it-shore',
          topic: `${topic}.state`,
          logger: quietLogger(),
        });
        kafkaStores.push(k);
        return k;
      };
      const storeA = await store();
      const storeB = await store();
      const pair: DerivedRecord[] = [];
      let both = false;
      let settle: () => void = () => undefined;
      const settled = new Promise<void>((r) => (settle = r));
      let release: (() => void) | undefined;
      let heldAt: { partition: number; offset: bigint } | undefined;
      const a: ShoreMember = member(sites, topic, group, storeA, pair, ({ partition, offset }) => {
        if (!both) return settled; // held (heartbeating) until the group has settled on one partition each
        // Held at the first message past half of a partition a owns (one, unless the group rebalanced
        // meanwhile and gave it both: b then takes over whatever a held when a is killed).
        const half = (hw.get(partition) ?? 0n) / 2n;
        if (!a.assigned().includes(partition) || BigInt(offset) < half) return undefined;
        heldAt ??= { partition, offset: BigInt(offset) };
        return new Promise<void>((r) => (release = r));
      });
      const b = member(sites, topic, group, storeB, pair, () => (both ? undefined : settled));
      await Promise.all([a.start(), b.start()]);
      await pollUntil(
        'each member owns one partition',
        async () => (a.assigned().length === 1 && b.assigned().length === 1 ? true : undefined),
        90_000,
      );
      both = true;
      settle();
      await pollUntil('member a held mid-stream', async () => heldAt, 90_000);
      const aStored = a.storedAt().get(heldAt?.partition ?? -1);
      const aStats = a.stats();
      const killing = a.kill();
      release?.();
      await killing;

      // 3. b takes a's partition over, restores its sites from the store, and drains everything.
      await pollUntil(
        'b owns both partitions',
        async () => (b.assigned().length === 2 ? true : undefined),
        90_000,
      );
      await drained(b, hw, 'survivor drained the topic');
      const bStats = b.stats();
      await b.stop();
      await Promise.all(kafkaStores.map((k) => k.close()));
      if (kind === 'kafka') {
        // The state topic keeps the latest entry per site: compacted.
        const adm = kafka.admin();
        await adm.connect();
        const d = await adm.describeConfigs({
          resources: [
            { type: ConfigResourceTypes.TOPIC, name: `${topic}.state`, configNames: ['cleanup.policy'] },
          ],
          includeSynonyms: false,
        });
        await adm.disconnect();
        expect(d.resources[0]?.configEntries[0]?.configValue).toBe('compact');
      }

      // a stored state part-way (so the takeover restores rather than starts cold) before it was held.
      expect(aStored).toBeDefined();
      expect((aStored ?? 0n) > 0n && (aStored ?? 0n) <= (heldAt?.offset ?? 0n)).toBe(true);
      expect(aStats.messages).toBeGreaterThan(0);
      expect(bStats.restores).toBeGreaterThan(0);

      const got = byId(pair);
      expect(got.conflicts).toEqual([]);
      expect([...got.map.keys()].sort()).toEqual([...ref.map.keys()].sort());
      for (const [id, json] of ref.map) expect(got.map.get(id), id).toBe(json);
    },
    240_000,
  );
});

async function tmp(): Promise<string> {
  return mkdtemp(path.join(tmpdir(), 'reefd-shore-'));
}
