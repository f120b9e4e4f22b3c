// The intake: source -> validate -> archive -> processor -> sinks, one message at a time, in arrival order.
// The processor sees messages in exactly the order the archive records them, so a replay of the archive
// reproduces the live records.
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
}

export interface Pipeline {
  handle(input: RawInput): Promise<void>;
  stats(): PipelineStats;
}

const MAX_DEAD_LETTER_PAYLOAD = 4096;
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
  };
  const prefix = o.config.topic_prefix;

  return {
    stats: () => structuredClone(stats),
    async handle(input) {
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
        }
      }
      input.ack();
    },
  };
}
