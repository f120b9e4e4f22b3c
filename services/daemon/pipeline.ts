// The intake: source -> validate -> archive -> processor -> sinks, one message at a time, in arrival order.
// The processor sees messages in exactly the order the archive records them, so a replay of the archive
// reproduces the live records.
import { createHash } from 'node:crypto';
import {
  archiveLine,
  parseMessage,
  type DerivedRecord,
  type ReefdConfig,
} from '../../libs/contract/index.js';
import { checkAgainstConfig, type Processor } from '../../libs/processor/index.js';
import type { Logger } from '../log/logger.js';
import type { ArchiveWriter, DeadLetterSink, RawInput, RecordSink } from '../pipeline/types.js';
import type { DaemonMetrics } from './metrics.js';

export interface PipelineOptions {
  config: ReefdConfig;
  processor: Processor;
  archive?: ArchiveWriter;
  sinks: readonly RecordSink[];
  deadLetter?: DeadLetterSink;
  metrics?: DaemonMetrics;
  logger?: Logger;
  /** Called with every batch of records (dashboard, notifier). Must not throw. */
  onRecords?: (records: readonly DerivedRecord[]) => void;
  /** Called when the archive refuses a write (disk full): the message is not acknowledged. */
  onArchiveError?: (err: Error) => void;
}

export interface PipelineStats {
  received: number;
  accepted: number;
  rejected: number;
  rejectsByReason: Record<string, number>;
  recordsByType: Record<string, number>;
  archiveErrors: number;
  /** Redeliveries of messages already archived: acknowledged, not archived or processed again. */
  redeliveries: number;
}

export interface Pipeline {
  handle(input: RawInput): Promise<void>;
  /** Marks messages as already archived (by redeliveryKey), e.g. the archive tail read at a restart. */
  rememberArchived(keys: Iterable<string>): void;
  stats(): PipelineStats;
}

const MAX_DEAD_LETTER_PAYLOAD = 4096;
/** How many recent messages are remembered to recognise redeliveries (a broker resends its in-flight window). */
const REDELIVERY_MEMORY = 50_000;

/**
 * The identity of a received message: its topic and a digest of its payload. The payload is compared as
 * canonical JSON when it is JSON, so a message read back from the archive (stored parsed) has the same key.
 */
export function redeliveryKey(topic: string, payload: Uint8Array | string, parsed?: unknown): string {
  let canonical: string;
  if (parsed !== undefined) canonical = typeof parsed === 'string' ? parsed : JSON.stringify(parsed);
  else {
    const text = typeof payload === 'string' ? payload : decoder.decode(payload);
    try {
      canonical = JSON.stringify(JSON.parse(text));
    } catch {
      canonical = text;
    }
  }
  return `${topic}\u0000${createHash('sha1').update(canonical).digest('base64')}`;
}
/** Archive retries on a full disk before the message is left to the broker's redelivery (~10 min). */
const ARCHIVE_RETRIES = 125;
const decoder = new TextDecoder('utf-8', { fatal: false });

export function createPipeline(o: PipelineOptions): Pipeline {
  const stats: PipelineStats = {
    received: 0,
    accepted: 0,
    rejected: 0,
    rejectsByReason: {},
    recordsByType: {},
    archiveErrors: 0,
    redeliveries: 0,
  };
  const prefix = o.config.topic_prefix;
  // Recently archived messages by content, oldest first (bounded): see handle().
  const recent = new Map<string, Promise<void>>();
  const remember = (key: string, p: Promise<void>) => {
    recent.delete(key);
    recent.set(key, p);
    if (recent.size > REDELIVERY_MEMORY) recent.delete(recent.keys().next().value as string);
  };

  return {
    rememberArchived: (keys) => {
      for (const k of keys) remember(k, Promise.resolve());
    },
    stats: () => structuredClone(stats),
    async handle(input) {
      // A redelivery of a message already archived (the broker resends what it had not seen acknowledged,
      // e.g. after its own restart) is acknowledged once the first copy is durable, and neither archived
      // nor processed again: the archive holds every message once.
      // Only a delivery the source marks as repeated is compared: a sensor (or a flood) sending the same
      // bytes twice sent two messages, and the archive keeps both.
      const key = redeliveryKey(input.topic, input.payload);
      const earlier = input.redelivered ? recent.get(key) : undefined;
      if (earlier !== undefined) {
        stats.redeliveries++;
        await earlier.catch(() => undefined);
        input.ack();
        return;
      }
      const end = o.metrics?.processSeconds.startTimer();
      stats.received++;
      const parsed = parseMessage(input.topic, input.payload, prefix);
      let reason: string | undefined;
      if (!parsed.ok) reason = parsed.reason;
      else reason = checkAgainstConfig(o.config, parsed.message);
      const kind = parsed.ok ? parsed.message.kind : (parsed.parts?.kind ?? 'unknown');
      o.metrics?.messagesIn.inc({ kind });

      const text = decoder.decode(input.payload);
      const rxIso = new Date(input.rxMs).toISOString();
      // Archive first: the broker's acknowledgement waits for the fsync (append resolves after it).
      const line = o.archive ? archiveLine(input.topic, rxIso, text, reason) : '';
      let archived = o.archive ? o.archive.append(line, input.rxMs) : Promise.resolve();
      remember(key, archived);

      let records: DerivedRecord[] = [];
      if (reason !== undefined || !parsed.ok) {
        const code = reason ?? 'invalid';
        stats.rejected++;
        const short = code.split(':')[0] ?? code;
        stats.rejectsByReason[short] = (stats.rejectsByReason[short] ?? 0) + 1;
        o.metrics?.rejects.inc({ reason: short });
        o.deadLetter?.write({
          topic: input.topic,
          rxMs: input.rxMs,
          reason: code,
          payload: text.length > MAX_DEAD_LETTER_PAYLOAD ? text.slice(0, MAX_DEAD_LETTER_PAYLOAD) : text,
        });
      } else {
        stats.accepted++;
        const r = o.processor.push(parsed.message, input.rxMs);
        if (r.status === 'duplicate') o.metrics?.duplicates.inc();
        if (r.late) o.metrics?.late.inc();
        o.metrics?.lagSeconds.set((input.rxMs - parsed.message.tMs) / 1000);
        records = r.records;
      }
      if (records.length > 0) {
        for (const r of records) {
          stats.recordsByType[r.type] = (stats.recordsByType[r.type] ?? 0) + 1;
          o.metrics?.recordsOut.inc({ type: r.type });
        }
        for (const s of o.sinks) s.write(records);
        o.onRecords?.(records);
      }
      end?.();
      // A full disk is retried (the broker does not redeliver an unacknowledged message on the same
      // connection, so giving up would leave it out of the archive until a reconnect). The messages waiting
      // here are bounded by the source's in-flight window (MQTT Receive Maximum).
      for (let attempt = 0; ; attempt++) {
        try {
          await archived;
          break;
        } catch (err) {
          stats.archiveErrors++;
          if (attempt === 0)
            o.logger?.error({ err }, 'archive write failed; the message stays unacknowledged at the broker');
          o.onArchiveError?.(err as Error);
          const code = (err as { code?: string }).code;
          if (code !== 'REEFD_DISK_FULL' || attempt >= ARCHIVE_RETRIES || !o.archive) return;
          await new Promise((r) => setTimeout(r, Math.min(5000, 250 * 2 ** attempt)));
          archived = o.archive.append(line, input.rxMs);
          remember(key, archived);
        }
      }
      input.ack();
    },
  };
}
