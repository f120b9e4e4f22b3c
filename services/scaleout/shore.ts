// Processor mode at the shore (deploy/SCALING.md): one member of a Kafka consumer group on the raw topic.
// Partitions carry whole sites (partition.ts); the member runs one processor per site it meets, created
// from that site's configuration and restored from the state store the first time the site shows up in
// this group generation. Every snapshotEveryMs (and on a graceful stop) it stores the state of every site
// on a partition with the offset the state reaches, and only then commits that offset. The next owner of
// the partition resumes from the committed offset with the stored state and skips what the state already
// holds, so a moved partition resumes its windows exactly. Output is at-least-once (records emitted after
// the last snapshot come again from the new owner); the sinks' overwrite on (series, time) makes the
// database see each record once.
import type { Consumer, EachBatchPayload, KafkaMessage } from 'kafkajs';
import { parseMessage, type DerivedRecord, type ReefdConfig } from '../../libs/contract/index.js';
import {
  checkAgainstConfig,
  createProcessor,
  type Processor,
  type ProcessorOptions,
} from '../../libs/processor/index.js';
import type { Logger } from '../log/logger.js';
import { kafkaClient } from '../transport/kafka-client.js';
import type { TlsFiles } from '../transport/tls.js';
import { kafkaTopicOf } from '../sources/kafka-topic.js';
import { siteOfKey } from './partition.js';
import type { SiteStateStore } from './state-store.js';

/** Topic prefix of the topics rebuilt from Kafka keys (internal: parse and rebuild use the same one). */
const PREFIX = 'reef';

export interface ShoreMemberOptions {
  sites: readonly ReefdConfig[];
  /**
   * Each site's calibration file and field log as the processor takes them (services/config/field-files.ts),
   * keyed by site: a shore member derives what the single daemon derives from the same files.
   */
  processorOptions?: ReadonlyMap<string, ProcessorOptions>;
  brokers: readonly string[];
  clientId: string;
  groupId: string;
  topic: string;
  tls?: TlsFiles | undefined;
  sasl?:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string }
    | undefined;
  store: SiteStateStore;
  /** State is stored (and offsets committed) at most this often per partition (default 10 s). */
  snapshotEveryMs?: number;
  /** Receives every record batch, with where it came from. Must not throw. */
  onRecords: (records: readonly DerivedRecord[], at: { site: string; partition: number }) => void;
  /** Makes records handed to onRecords durable (sinks' flush): awaited before each state store + commit. */
  flushOutputs?: () => Promise<void>;
  logger: Logger;
  sessionTimeoutMs?: number;
  maxBytesPerPartition?: number;
  /** Awaited before each message (benchmarks and tests hold a member at a chosen offset). */
  pace?: (at: { partition: number; offset: string }) => Promise<void> | undefined;
}

export interface ShoreStats {
  messages: number;
  skipped: number;
  rejected: number;
  unknownSite: number;
  duplicates: number;
  records: number;
  restores: number;
  snapshots: number;
}

export interface ShoreMember {
  start(): Promise<void>;
  /** Graceful: stores the state of every owned partition, commits, leaves the group. */
  stop(): Promise<void>;
  /** A crash stand-in: stops at once and leaves the group without storing state or committing. */
  kill(): Promise<void>;
  /** Partitions of the current assignment. */
  assigned(): readonly number[];
  /** Next offset to process, per partition handled in this generation. */
  positions(): ReadonlyMap<number, bigint>;
  /** Offset of the last stored state, per partition. */
  storedAt(): ReadonlyMap<number, bigint>;
  stats(): ShoreStats;
}

interface SiteProc {
  processor: Processor;
  /** Messages below this offset (on `partition`) are already in the restored state. */
  skipBelow: bigint | undefined;
  partition: number;
}

class Member implements ShoreMember {
  readonly #o: ShoreMemberOptions;
  readonly #configs: Map<string, ReefdConfig>;
  #consumer: Consumer | undefined;
  #owned = new Map<string, SiteProc>();
  #partSites = new Map<number, Set<string>>();
  #next = new Map<number, bigint>();
  #stored = new Map<number, bigint>();
  #lastSnap = new Map<number, number>();
  #assigned: number[] = [];
  #generation = 0;
  #halt: 'no' | 'stop' | 'kill' = 'no';
  #busy: Promise<void> = Promise.resolve();
  #stats: ShoreStats = {
    messages: 0,
    skipped: 0,
    rejected: 0,
    unknownSite: 0,
    duplicates: 0,
    records: 0,
    restores: 0,
    snapshots: 0,
  };

  constructor(o: ShoreMemberOptions) {
    this.#o = o;
    this.#configs = new Map(o.sites.map((c) => [c.site, c]));
  }

  async start(): Promise<void> {
    const o = this.#o;
    const consumer = kafkaClient(o).consumer({
      groupId: o.groupId,
      allowAutoTopicCreation: false,
      sessionTimeout: o.sessionTimeoutMs ?? 10_000,
      heartbeatInterval: 1_000,
      rebalanceTimeout: 20_000,
      maxBytesPerPartition: o.maxBytesPerPartition ?? 1024 * 1024,
    });
    this.#consumer = consumer;
    consumer.on(consumer.events.GROUP_JOIN, (e) => {
      // A new generation starts from the committed offsets: in-memory state of the old one is dropped
      // and each site is restored from the store when it shows up again.
      this.#generation++;
      this.#owned.clear();
      this.#partSites.clear();
      this.#next.clear();
      this.#assigned = [...(e.payload.memberAssignment[o.topic] ?? [])].sort((a, b) => a - b);
      o.logger.info({ groupId: o.groupId, partitions: this.#assigned }, 'shore member assigned partitions');
    });
    await consumer.connect();
    await consumer.subscribe({ topics: [o.topic], fromBeginning: true });
    await consumer.run({
      autoCommit: false,
      eachBatchAutoResolve: false,
      partitionsConsumedConcurrently: 1,
      eachBatch: (p) => {
        const run = this.#batch(p);
        this.#busy = run.catch(() => undefined);
        return run;
      },
    });
  }

  async #batch(p: EachBatchPayload): Promise<void> {
    const { batch } = p;
    const partition = batch.partition;
    const gen = this.#generation;
    let beat = Date.now();
    for (const m of batch.messages) {
      if (this.#halt !== 'no' || gen !== this.#generation || !p.isRunning() || p.isStale()) return;
      const paced = this.#o.pace?.({ partition, offset: m.offset });
      if (paced !== undefined) await this.#waitBeating(paced, p);
      if (this.#halt !== 'no' || gen !== this.#generation) return;
      await this.#handle(partition, m);
      p.resolveOffset(m.offset);
      const now = Date.now();
      if (now - (this.#lastSnap.get(partition) ?? 0) >= (this.#o.snapshotEveryMs ?? 10_000))
        await this.#snapshot(partition);
      if (now - beat > 1000) {
        beat = now;
        await p.heartbeat();
      }
    }
  }

  /** Waits for `until` while heartbeating, so the group neither times the member out nor waits on it. */
  async #waitBeating(until: Promise<void>, p: EachBatchPayload): Promise<void> {
    let done = false;
    void until.then(() => (done = true));
    while (!done && this.#halt === 'no') {
      await Promise.race([until, new Promise((r) => setTimeout(r, 500))]);
      // Throws when the group rebalances: the batch ends and kafkajs rejoins.
      if (!done && this.#halt === 'no') await p.heartbeat();
    }
  }

  async #handle(partition: number, m: KafkaMessage): Promise<void> {
    const offset = BigInt(m.offset);
    this.#next.set(partition, offset + 1n);
    const site = siteOfKey(m.key?.toString('utf8') ?? '');
    const cfg = site !== undefined ? this.#configs.get(site) : undefined;
    if (site === undefined || cfg === undefined) {
      this.#stats.unknownSite++;
      return;
    }
    let sp = this.#owned.get(site);
    if (sp === undefined) {
      sp = await this.#restore(cfg, partition);
      this.#owned.set(site, sp);
    }
    let sites = this.#partSites.get(partition);
    if (sites === undefined) this.#partSites.set(partition, (sites = new Set()));
    sites.add(site);
    if (sp.skipBelow !== undefined && offset < sp.skipBelow) {
      this.#stats.skipped++;
      return;
    }
    this.#stats.messages++;
    const payload = m.value ?? Buffer.alloc(0);
    const parsed = parseMessage(kafkaTopicOf(PREFIX, m.key, m.value), payload, PREFIX);
    const reason = parsed.ok ? checkAgainstConfig(cfg, parsed.message) : parsed.reason;
    if (!parsed.ok || reason !== undefined) {
      // The edge archived it (as rejected or not); the shore only counts it.
      this.#stats.rejected++;
      return;
    }
    const rxMs = Number(m.timestamp);
    const r = sp.processor.push(parsed.message, Number.isFinite(rxMs) ? rxMs : parsed.message.tMs);
    if (r.status === 'duplicate') this.#stats.duplicates++;
    if (r.records.length > 0) {
      this.#stats.records += r.records.length;
      this.#o.onRecords(r.records, { site, partition });
    }
  }

  async #restore(cfg: ReefdConfig, partition: number): Promise<SiteProc> {
    const e = await this.#o.store.load(cfg.site);
    const options = this.#o.processorOptions?.get(cfg.site);
    if (e === undefined)
      return { processor: createProcessor(cfg, undefined, options), skipBelow: undefined, partition };
    this.#stats.restores++;
    if (e.partition !== partition)
      this.#o.logger.warn(
        { site: cfg.site, was: e.partition, now: partition, code: 'REEFD_SCALEOUT_PARTITION_MOVED' },
        'site state was stored for another partition (partition count changed?); duplicates are dropped by the processor',
      );
    return {
      processor: createProcessor(cfg, e.state, options),
      skipBelow: e.partition === partition ? BigInt(e.offset) : undefined,
      partition,
    };
  }

  /** Stores every site of the partition at the partition's position, then commits that position. */
  async #snapshot(partition: number): Promise<void> {
    const offset = this.#next.get(partition);
    if (offset === undefined || this.#killed()) return;
    const savedAt = new Date().toISOString();
    const entries = [...(this.#partSites.get(partition) ?? [])].flatMap((site) => {
      const sp = this.#owned.get(site);
      return sp
        ? [{ site, partition, offset: offset.toString(), state: sp.processor.snapshot(), savedAt }]
        : [];
    });
    this.#lastSnap.set(partition, Date.now());
    await this.#o.flushOutputs?.();
    for (const e of entries) {
      if (this.#killed()) return;
      await this.#o.store.save(e);
    }
    if (this.#killed()) return;
    await this.#consumer?.commitOffsets([{ topic: this.#o.topic, partition, offset: offset.toString() }]);
    this.#stored.set(partition, offset);
    this.#stats.snapshots++;
  }

  #killed(): boolean {
    return this.#halt === 'kill';
  }

  async stop(): Promise<void> {
    if (this.#halt !== 'no') return;
    this.#halt = 'stop';
    await this.#busy;
    for (const partition of [...this.#next.keys()]) await this.#snapshot(partition);
    await this.#consumer?.disconnect();
  }

  async kill(): Promise<void> {
    if (this.#killed()) return;
    this.#halt = 'kill';
    await this.#consumer?.disconnect();
  }

  assigned = (): readonly number[] => this.#assigned;
  positions = (): ReadonlyMap<number, bigint> => new Map(this.#next);
  storedAt = (): ReadonlyMap<number, bigint> => new Map(this.#stored);
  stats = (): ShoreStats => ({ ...this.#stats });
}

export function createShoreMember(o: ShoreMemberOptions): ShoreMember {
  return new Member(o);
}
