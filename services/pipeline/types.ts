// The interfaces between the daemon's parts. Data flows one way:
// source -> decode and validate -> archive (durable) -> processor -> sinks -> acknowledgement.
// Nothing downstream calls back upstream.
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { ArchiveMessage } from '../archive/line.js';

/** One message as a source received it, before validation. */
export interface RawInput {
  /** MQTT topic (for Kafka, rebuilt from the record key and the payload's kind field). */
  topic: string;
  payload: Uint8Array;
  /** Receive time, ms since the epoch (wall clock of the receiving host). */
  rxMs: number;
  /**
   * Called once the message is durably in the raw archive and its derived records are handed to the
   * sinks: an MQTT source sends PUBACK then; a Kafka source marks the offset committable.
   */
  ack(): void;
  /** The source says this is a redelivery (MQTT DUP flag): it may already be in the archive. */
  redelivered?: boolean;
}

/** A source pushes raw inputs into the intake and stops on request. */
export interface Source {
  readonly name: string;
  start(push: (input: RawInput) => void): Promise<void>;
  /** Stops intake; unacknowledged messages stay with the broker for redelivery. */
  stop(): Promise<void>;
  /** True while connected (for /readyz). */
  connected(): boolean;
}

/** The raw archive: every received message, accepted or rejected (contract section 2). */
export interface ArchiveWriter {
  /** Appends one NDJSON line (no newline). Resolves when the line is fsync'd. */
  append(line: string, rxMs: number): Promise<void>;
  /** Appends the line of one received message, its payload spliced in as received (services/archive/line.ts). */
  appendMessage(m: ArchiveMessage): Promise<void>;
  flush(): Promise<void>;
  close(): Promise<void>;
}

export interface SinkStats {
  written: number;
  failed: number;
  /** Records waiting in memory or in the disk spool. */
  pending: number;
  spoolBytes?: number;
  /** Records not written again because the destination already held their stream position. */
  skipped?: number;
  lastError?: string;
}

/**
 * A destination for derived records. Every sink passes the shared contract suite
 * (test/integration/sink-contract.ts): order kept per series, nothing lost across close/reopen,
 * idempotent on the same series and timestamp.
 *
 * Positions: the daemon numbers the records of a site's stream (the n-th record the processor produced
 * since the stream began, see services/daemon/cursor.ts). The numbers depend only on the raw archive, so a
 * restart that derives the archive tail again gives each record the number it had. A sink that is told
 * the numbers keeps, with the destination or beside it, the highest one it holds and skips a record at or
 * below it: records are written once across crashes. Without numbers (replay to stdout, shore members) a
 * sink writes everything it is given.
 */
export interface RecordSink {
  readonly name: string;
  /**
   * Accepts records; never throws for a remote outage (the sink spools and retries). `firstPos` is the
   * stream position of records[0]; records[i] has position firstPos + i.
   */
  write(records: readonly DerivedRecord[], firstPos?: number): void;
  /** Resolves when everything accepted so far is durable at the destination or in the spool. */
  flush(): Promise<void>;
  close(): Promise<void>;
  stats(): SinkStats;
}

/** A rejected message, for the dead-letter output. */
export interface DeadLetter {
  topic: string;
  rxMs: number;
  reason: string;
  /** The payload text, truncated to a bounded size. */
  payload: string;
}

export interface DeadLetterSink {
  write(letter: DeadLetter): void;
  flush(): Promise<void>;
  close(): Promise<void>;
  /** Letters dropped by the rate limit (they are still in the raw archive). */
  suppressed(): number;
}
