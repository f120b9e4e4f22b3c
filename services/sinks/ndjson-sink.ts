// Derived records as NDJSON (the replay output, contract section 4): one record per line, in arrival order,
// to a file (appended, fsync'd on flush) or to a writable stream such as stdout.
// write() never blocks; a producer faster than the destination applies backpressure by awaiting flush(),
// which resolves once the stream has drained (and, for a file, once the data is fsync'd).
import { open } from 'node:fs/promises';
import type { Writable } from 'node:stream';
import type { DerivedRecord } from '../../libs/contract/index.js';
import type { RecordSink, SinkStats } from '../pipeline/types.js';
import { TextFile } from './text-file.js';

export type NdjsonSinkOptions = { name?: string } & ({ path: string } | { stream: Writable });

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

class NdjsonSink implements RecordSink {
  readonly name: string;
  readonly #t: TextFile | StreamTarget;
  #stats: SinkStats = { written: 0, failed: 0, pending: 0 };
  constructor(name: string, t: TextFile | StreamTarget) {
    this.name = name;
    this.#t = t;
  }
  write(records: readonly DerivedRecord[]): void {
    if (records.length === 0) return;
    let text = '';
    for (const r of records) text += JSON.stringify(r) + '\n';
    this.#t.write(text);
    this.#stats.pending += records.length;
  }
  async flush(): Promise<void> {
    const n = this.#stats.pending;
    try {
      await this.#t.flush();
      this.#stats.written += n;
    } catch (err) {
      this.#stats.failed += n;
      this.#stats.lastError = (err as Error).message;
      throw err;
    } finally {
      this.#stats.pending -= n;
    }
  }
  async close(): Promise<void> {
    const n = this.#stats.pending;
    await this.#t.close();
    this.#stats.written += n;
    this.#stats.pending -= n;
  }
  stats(): SinkStats {
    return { ...this.#stats };
  }
}

/** A file is opened for appending (created if missing); a stream is written as it is and never ended. */
export async function createNdjsonSink(o: NdjsonSinkOptions): Promise<RecordSink> {
  if ('path' in o) return new NdjsonSink(o.name ?? 'ndjson', new TextFile(await open(o.path, 'a')));
  return new NdjsonSink(o.name ?? 'ndjson', new StreamTarget(o.stream));
}
