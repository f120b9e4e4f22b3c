// Derived records as NDJSON (the replay output, contract section 4): one record per line, in arrival order,
// to a file (appended, fsync'd on flush) or to a writable stream such as stdout.
// write() never blocks; a producer faster than the destination applies backpressure by awaiting flush(),
// which resolves once the stream has drained (and, for a file, once the data is fsync'd).
//
// Exactly once across crashes (a file with a ledger, as the daemon opens it): after each fsync the sink
// commits, in a small ledger file beside the data folder's other state, the file's length and the stream
// position of its last record. At the next start the file is cut back to the committed length (a crash may
// have left records after it, or half a line) and records at or below the committed position are skipped:
// the daemon derives the rest again from the archive, numbered as before, and they are appended once.
import { open, stat, truncate } from 'node:fs/promises';
import type { Writable } from 'node:stream';
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import type { RecordSink, SinkStats } from '../pipeline/types.js';
import { readJsonFile, writeFileAtomic } from './atomic-file.js';
import { TextFile } from './text-file.js';

export interface NdjsonLedgerOptions {
  /** The ledger file (in the data folder). */
  file: string;
  /** The stream's epoch: positions of another epoch say nothing about this stream. */
  epoch: string;
  /** Commit at least this often while records arrive (default 1000 ms). */
  commitMs?: number;
  logger?: Logger;
}

export type NdjsonSinkOptions = { name?: string } & (
  { path: string; ledger?: NdjsonLedgerOptions } | { stream: Writable }
);

class StreamTarget {
  readonly #s: Writable;
  #error: Error | undefined;
  constructor(s: Writable) {
    this.#s = s;
    s.on('error', (err: Error) => (this.#error = err));
  }
  write(text: string): void {
    if (this.#error === undefined) this.#s.write(text);
  }
  async flush(): Promise<void> {
    if (this.#error !== undefined) throw this.#error;
    if (this.#s.writableNeedDrain) await new Promise<void>((r) => this.#s.once('drain', r));
    await new Promise<void>((resolve, reject) => this.#s.write('', (err) => (err ? reject(err) : resolve())));
  }
  async close(): Promise<void> {
    await this.flush();
  }
}

interface LedgerContent {
  epoch: string;
  /** Position of the last record in the committed part of the file; -1 for none. */
  pos: number;
  /** Length of the committed part of the file, bytes. */
  bytes: number;
}

function parseLedger(v: unknown): LedgerContent | undefined {
  const l = v as Partial<LedgerContent> | undefined;
  return typeof l?.epoch === 'string' && typeof l.pos === 'number' && typeof l.bytes === 'number'
    ? { epoch: l.epoch, pos: l.pos, bytes: l.bytes }
    : undefined;
}

/** The committed length and position of a file output (undefined: write without positions). */
class FileLedger {
  readonly #o: NdjsonLedgerOptions;
  /** Highest position written (committed or not). */
  hwm: number;
  #committed: LedgerContent;
  #bytes: number;
  constructor(o: NdjsonLedgerOptions, start: LedgerContent, bytes: number) {
    this.#o = o;
    this.#committed = start;
    this.hwm = start.pos;
    this.#bytes = bytes;
  }
  wrote(bytes: number, pos: number | undefined): void {
    this.#bytes += bytes;
    if (pos !== undefined && pos > this.hwm) this.hwm = pos;
  }
  dirty(): boolean {
    return this.#bytes !== this.#committed.bytes || this.hwm !== this.#committed.pos;
  }
  /** What has been written so far: taken before an fsync, committed after it. */
  mark(): LedgerContent {
    return { epoch: this.#o.epoch, pos: this.hwm, bytes: this.#bytes };
  }
  async commit(m: LedgerContent): Promise<void> {
    if (m.bytes === this.#committed.bytes && m.pos === this.#committed.pos) return;
    await writeFileAtomic(this.#o.file, JSON.stringify(m));
    this.#committed = m;
  }
}

/** Reads the ledger and cuts the file back to its committed length (records after it come again). */
async function openLedger(path: string, o: NdjsonLedgerOptions): Promise<FileLedger> {
  const saved = parseLedger(await readJsonFile(o.file));
  let size = 0;
  try {
    size = (await stat(path)).size;
  } catch {
    // a new file
  }
  if (saved === undefined || saved.epoch !== o.epoch) {
    // Nothing of this stream is in the file yet: whatever is there stays, the stream is appended.
    return new FileLedger(o, { epoch: o.epoch, pos: -1, bytes: size }, size);
  }
  if (size > saved.bytes) {
    await truncate(path, saved.bytes);
    o.logger?.info(
      { file: path, removedBytes: size - saved.bytes },
      'ndjson output: records written after the last commit removed; they are written again',
    );
    size = saved.bytes;
  }
  // A file shorter than committed was cut or rotated by someone else: the stream goes on from its end.
  return new FileLedger(o, { ...saved, bytes: size }, size);
}

class NdjsonSink implements RecordSink {
  readonly name: string;
  readonly #t: TextFile | StreamTarget;
  readonly #ledger: FileLedger | undefined;
  #stats: SinkStats = { written: 0, failed: 0, pending: 0, skipped: 0 };
  #flushing: Promise<void> = Promise.resolve();
  #timer: NodeJS.Timeout | undefined;
  constructor(name: string, t: TextFile | StreamTarget, ledger?: FileLedger, commitMs = 1000) {
    this.name = name;
    this.#t = t;
    this.#ledger = ledger;
    if (ledger !== undefined) {
      this.#timer = setInterval(() => {
        if (ledger.dirty()) this.flush().catch(() => undefined);
      }, commitMs);
      this.#timer.unref();
    }
  }
  write(records: readonly DerivedRecord[], firstPos?: number): void {
    if (records.length === 0) return;
    let text = '';
    let n = 0;
    let last: number | undefined;
    for (let i = 0; i < records.length; i++) {
      const pos = firstPos === undefined ? undefined : firstPos + i;
      if (pos !== undefined && this.#ledger !== undefined && pos <= this.#ledger.hwm) {
        (this.#stats.skipped as number)++;
        continue;
      }
      text += JSON.stringify(records[i]) + '\n';
      n++;
      last = pos;
    }
    if (n === 0) return;
    this.#t.write(text);
    this.#ledger?.wrote(Buffer.byteLength(text), last);
    this.#stats.pending += n;
  }
  flush(): Promise<void> {
    // One flush at a time: the ledger may only commit what an fsync before it made durable.
    const next = this.#flushing.then(() => this.#flushNow());
    this.#flushing = next.catch(() => undefined);
    return next;
  }
  async #flushNow(): Promise<void> {
    const n = this.#stats.pending;
    const mark = this.#ledger?.mark();
    try {
      await this.#t.flush();
      if (mark !== undefined) await this.#ledger?.commit(mark);
      this.#stats.written += n;
      this.#stats.pending -= n;
    } catch (err) {
      this.#stats.lastError = (err as Error).message;
      // A full disk: the records wait in memory (text-file.ts) and count when a later flush writes them.
      if ((err as { code?: string }).code !== 'REEFD_DISK_FULL') {
        this.#stats.failed += n;
        this.#stats.pending -= n;
      }
      throw err;
    }
  }
  async close(): Promise<void> {
    if (this.#timer !== undefined) clearInterval(this.#timer);
    await this.flush();
    await this.#t.close();
  }
  stats(): SinkStats {
    return { ...this.#stats };
  }
}

/** A file is opened for appending (created if missing); a stream is written as it is and never ended. */
export async function createNdjsonSink(o: NdjsonSinkOptions): Promise<RecordSink> {
  if ('path' in o) {
    const ledger = o.ledger === undefined ? undefined : await openLedger(o.path, o.ledger);
    return new NdjsonSink(
      o.name ?? 'ndjson',
      new TextFile(await open(o.path, 'a')),
      ledger,
      o.ledger?.commitMs,
    );
  }
  return new NdjsonSink(o.name ?? 'ndjson', new StreamTarget(o.stream));
}
