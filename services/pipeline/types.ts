// The interfaces between the daemon's parts. Data flows one way:
// source -> validate -> archive -> processor -> sinks. Nothing downstream calls back upstream.
import type { DerivedRecord } from '../../libs/contract/index.js';

/** One message as a source received it, before validation. */
export interface RawInput {
  /** MQTT topic (for Kafka, rebuilt from the record key and the payload's kind field). */
  topic: string;
  payload: Uint8Array;
  /** Receive time, ms since the epoch (wall clock of the receiving host). */
  rxMs: number;
  /**
   * Called once the message is durably in the raw archive (and, for Kafka, once the derived records are
   * handed to the sinks): an MQTT source sends PUBACK then; a Kafka source marks the offset committable.
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
  flush(): Promise<void>;
  close(): Promise<void>;
}

export interface SinkStats {
  written: number;
  failed: number;
  /** Records waiting in memory or in the disk spool. */
  pending: number;
  spoolBytes?: number;
  lastError?: string;
}

/**
 * A destination for derived records. Every sink passes the shared contract suite
 * (test/integration/sink-contract.ts): order kept per series, nothing lost across close/reopen,
 * idempotent on the same series and timestamp.
 */
export interface RecordSink {
  readonly name: string;
  /** Accepts records; never throws for a remote outage (the sink spools and retries). */
  write(records: readonly DerivedRecord[]): void;
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
