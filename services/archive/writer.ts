// The raw archive writer (contract section 2): daily NDJSON files by UTC day of the receive time,
// group commit (many appends share one write and fsync; each append resolves after its fsync), rotation at
// the day boundary, gzip of closed days, retention in days.
// A commit starts when the waiting lines reach a count or a size, or when the oldest has waited fsyncMs,
// whichever comes first; commits run one at a time and each takes every line waiting when it starts, so
// under load the batches grow with the fsync time instead of the acknowledgements waiting for a timer.
import { mkdir, readdir, rm } from 'node:fs/promises';
import { join } from 'node:path';
import { ReefdError } from '../../libs/contract/index.js';
import type { ArchiveWriter } from '../pipeline/types.js';
import { errFields, type Logger } from '../log/logger.js';
import { compressFile, repairArchiveDir } from './compress.js';
import { archiveLineBytes, type ArchiveMessage } from './line.js';
import {
  dayOf,
  dayOfName,
  openAppendFile,
  plainName,
  type AppendFile,
  type OpenAppendFile,
} from './files.js';
import { ARCHIVE_ERRORS } from './errors.js';

export interface ArchiveWriterOptions {
  dir: string;
  /** Longest time a line waits for its commit to start; 0 = on the next turn of the event loop. */
  fsyncMs: number;
  /** Files of days more than this many days before the clock's day are removed; 0 keeps everything. */
  retentionDays: number;
  /** Wall clock in ms, for closing days and retention. */
  clock: () => number;
  logger?: Logger;
  /** Waiting lines of this many bytes are committed at once instead of waiting for the timer (1 MiB). */
  maxBatchBytes?: number;
  /** This many waiting lines are committed at once (default 256, well below the broker's in-flight window). */
  maxBatchLines?: number;
  /** For tests: replaces the file opener (e.g. to simulate a full disk). */
  openFile?: OpenAppendFile;
}

export interface ArchiveWriterStats {
  lines: number;
  fsyncs: number;
  /** Wall time of the commits (write + fsync), summed and the longest, ms: the acknowledgement delay floor. */
  commitMsTotal: number;
  commitMsMax: number;
  bytes: number;
  openDay: string | undefined;
  errors: number;
}

interface Pending {
  data: Buffer;
  day: number;
  resolve: () => void;
  reject: (err: Error) => void;
}

export interface RawArchiveWriter extends ArchiveWriter {
  /**
   * Appends the line of one received message, its payload spliced in as received when it is JSON
   * (line.ts). Resolves when the line is fsync'd, like append(). The payload is copied before this returns.
   */
  appendMessage(m: ArchiveMessage): Promise<void>;
  /** Closes a finished day, compresses closed days and applies retention; also runs on a timer. */
  maintain(): Promise<void>;
  stats(): ArchiveWriterStats;
}

function diskError(err: unknown, path: string): Error {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  if (code === 'ENOSPC' || code === 'EDQUOT') {
    return new ReefdError(
      'REEFD_DISK_FULL',
      `No space left for the raw archive in ${path}; free space there.`,
      {
        retriable: true,
        detail: { path },
        cause: err,
      },
    );
  }
  return err instanceof Error ? err : new Error(String(err));
}

class Writer implements RawArchiveWriter {
  readonly #o: ArchiveWriterOptions;
  readonly #open: OpenAppendFile;
  readonly #maxBatch: number;
  readonly #maxLines: number;
  #file: AppendFile | undefined;
  #fileDay = -1;
  /** First day that may still be written: every earlier day with a `.gz` is closed for good. */
  #minDay = -1;
  /** Bytes known to be complete lines in the open file; a failed write is truncated back to it. */
  #goodSize = 0;
  #queue: Pending[] = [];
  #queueBytes = 0;
  #timer: NodeJS.Timeout | undefined;
  #immediate: NodeJS.Immediate | undefined;
  #chain: Promise<void> = Promise.resolve();
  #closed = false;
  /** A failed write could not be cut back: the next write starts a new line. */
  #needsNewline = false;
  #maintTimer: NodeJS.Timeout | undefined;
  #maintChain: Promise<void> = Promise.resolve();
  #stats: ArchiveWriterStats = {
    lines: 0,
    fsyncs: 0,
    commitMsTotal: 0,
    commitMsMax: 0,
    bytes: 0,
    openDay: undefined,
    errors: 0,
  };

  constructor(o: ArchiveWriterOptions) {
    this.#o = o;
    this.#open = o.openFile ?? openAppendFile;
    this.#maxBatch = o.maxBatchBytes ?? 1024 * 1024;
    this.#maxLines = o.maxBatchLines ?? 256;
  }

  async init(): Promise<void> {
    await mkdir(this.#o.dir, { recursive: true });
    const removed = await repairArchiveDir(this.#o.dir);
    for (const name of await readdir(this.#o.dir)) {
      const day = dayOfName(name);
      if (day !== undefined && name.endsWith('.gz')) this.#minDay = Math.max(this.#minDay, day + 1);
    }
    if (removed.length > 0)
      this.#o.logger?.warn({ removed }, 'raw archive: removed leftovers of an interrupted gzip');
    this.#maintTimer = setInterval(() => {
      this.maintain().catch((err: unknown) =>
        this.#o.logger?.error(errFields(err), 'raw archive maintenance failed'),
      );
    }, 60_000);
    this.#maintTimer.unref();
  }

  append(line: string, rxMs: number): Promise<void> {
    if (this.#closed)
      return Promise.reject(ARCHIVE_ERRORS.error('REEFD_ARCHIVE_CLOSED', 'append after close()'));
    return this.#enqueue(
      Buffer.from(/[\n\r]/.test(line) ? line.replace(/[\n\r]/g, ' ') : line, 'utf8'),
      rxMs,
    );
  }

  appendMessage(m: ArchiveMessage): Promise<void> {
    if (this.#closed)
      return Promise.reject(ARCHIVE_ERRORS.error('REEFD_ARCHIVE_CLOSED', 'append after close()'));
    return this.#enqueue(archiveLineBytes(m), m.rxMs);
  }

  #enqueue(data: Buffer, rxMs: number): Promise<void> {
    // Days never go backwards: a line stamped with an already closed day goes to the open file, so a
    // compressed day is never reopened (a plain file beside its .gz would be taken for crash leftovers).
    const day = Math.max(dayOf(rxMs), this.#fileDay, this.#minDay);
    return new Promise<void>((resolve, reject) => {
      this.#queue.push({ data, day, resolve, reject });
      this.#queueBytes += data.length + 1;
      if (this.#queueBytes >= this.#maxBatch || this.#queue.length >= this.#maxLines || this.#o.fsyncMs === 0)
        this.#commitSoon();
      else if (this.#timer === undefined) {
        this.#timer = setTimeout(() => {
          this.#timer = undefined;
          void this.#commit();
        }, this.#o.fsyncMs);
      }
    });
  }

  /** After the appends of this turn of the event loop (they join the batch). */
  #commitSoon(): void {
    if (this.#immediate !== undefined) return;
    this.#immediate = setImmediate(() => {
      this.#immediate = undefined;
      void this.#commit();
    });
  }

  /** Runs one group commit after the previous one; commits are serialised so file order = append order. */
  #commit(): Promise<void> {
    return this.#serial(() => this.#commitNow());
  }

  #serial(fn: () => Promise<void>): Promise<void> {
    const next = this.#chain.then(fn);
    this.#chain = next.catch(() => undefined);
    return next;
  }

  async #commitNow(): Promise<void> {
    while (this.#queue.length > 0) {
      const batch = this.#queue;
      this.#queue = [];
      this.#queueBytes = 0;
      // These lines' timer is no longer needed; lines that arrive during this commit start their own.
      if (this.#timer !== undefined) {
        clearTimeout(this.#timer);
        this.#timer = undefined;
      }
      // Split at day changes: each file gets its own lines.
      let start = 0;
      while (start < batch.length) {
        const day = (batch[start] as Pending).day;
        let end = start;
        while (end < batch.length && (batch[end] as Pending).day === day) end++;
        await this.#writeGroup(batch.slice(start, end), day);
        start = end;
      }
    }
  }

  async #writeGroup(group: Pending[], day: number): Promise<void> {
    const path = join(this.#o.dir, plainName(day));
    try {
      if (this.#file === undefined || this.#fileDay !== day) await this.#rotateTo(day);
      const file = this.#file as AppendFile;
      const parts: Buffer[] = [];
      for (const p of group) parts.push(p.data, NL);
      const data = Buffer.concat(parts);
      const t0 = performance.now();
      try {
        await file.write(data);
        await file.sync();
      } catch (err) {
        // Never leave a partial line behind: cut the file back to its last complete line.
        await file.truncate(this.#goodSize).catch(() => {
          this.#needsNewline = true;
        });
        throw err;
      }
      this.#goodSize += data.length;
      this.#stats.lines += group.length;
      this.#stats.bytes += data.length;
      this.#stats.fsyncs++;
      const ms = performance.now() - t0;
      this.#stats.commitMsTotal += ms;
      if (ms > this.#stats.commitMsMax) this.#stats.commitMsMax = ms;
      for (const p of group) p.resolve();
    } catch (err) {
      this.#stats.errors++;
      const e = diskError(err, path);
      for (const p of group) p.reject(e);
    }
  }

  async #rotateTo(day: number): Promise<void> {
    const old = this.#file;
    const oldDay = this.#fileDay;
    this.#file = undefined;
    if (old !== undefined) await old.close();
    const file = await this.#open(join(this.#o.dir, plainName(day)));
    this.#file = file;
    this.#fileDay = day;
    this.#stats.openDay = plainName(day);
    this.#goodSize = await file.size();
    // A line cut short by a crash: the reader skips it; we start on a fresh line.
    const last = await file.readLastByte(this.#goodSize);
    if ((last !== undefined && last !== 0x0a) || this.#needsNewline) {
      await file.write(NL);
      await file.sync();
      this.#goodSize += 1;
      this.#needsNewline = false;
      this.#o.logger?.warn(
        { file: plainName(day) },
        'raw archive: previous run left a partial line; starting a new line',
      );
    }
    if (oldDay >= 0 && oldDay < day) void this.maintain().catch(() => undefined);
  }

  /** Maintenance runs one at a time; a call made during a run waits for it and then runs again. */
  maintain(): Promise<void> {
    const next = this.#maintChain.then(() => this.#maintainNow());
    this.#maintChain = next.catch(() => undefined);
    return next;
  }

  async #maintainNow(): Promise<void> {
    const today = dayOf(this.#o.clock());
    // A day that has ended with no new append: close its file so it can be compressed.
    if (this.#file !== undefined && this.#fileDay < today && this.#queue.length === 0) {
      await this.#serial(async () => {
        if (this.#file !== undefined && this.#fileDay < today && this.#queue.length === 0) {
          await this.#file.close();
          this.#file = undefined;
          this.#stats.openDay = undefined;
        }
      });
    }
    const names = (await readdir(this.#o.dir)).sort();
    for (const name of names) {
      const day = dayOfName(name);
      if (day === undefined) continue;
      if (this.#o.retentionDays > 0 && day < today - this.#o.retentionDays) {
        await rm(join(this.#o.dir, name), { force: true });
        this.#o.logger?.info({ file: name }, 'raw archive: removed by retention');
        continue;
      }
      const open = this.#file !== undefined && day === this.#fileDay;
      if (!name.endsWith('.gz') && day < today && !open) {
        this.#minDay = Math.max(this.#minDay, day + 1);
        await compressFile(this.#o.dir, name);
        this.#o.logger?.info({ file: name }, 'raw archive: day closed and compressed');
      }
    }
  }

  async flush(): Promise<void> {
    if (this.#timer !== undefined) {
      clearTimeout(this.#timer);
      this.#timer = undefined;
    }
    if (this.#immediate !== undefined) {
      clearImmediate(this.#immediate);
      this.#immediate = undefined;
    }
    await this.#commit().catch(() => undefined);
  }

  async close(): Promise<void> {
    if (this.#closed) return;
    await this.flush();
    this.#closed = true;
    if (this.#maintTimer !== undefined) clearInterval(this.#maintTimer);
    await this.#chain;
    await this.#maintChain;
    if (this.#file !== undefined) await this.#file.close();
    this.#file = undefined;
  }

  stats(): ArchiveWriterStats {
    return { ...this.#stats };
  }
}

const NL = Buffer.from('\n');

/** Opens (and repairs) the archive folder and returns the writer. */
export async function createArchiveWriter(opts: ArchiveWriterOptions): Promise<RawArchiveWriter> {
  const w = new Writer(opts);
  await w.init();
  return w;
}
