// A disk spool for a sink whose destination is unreachable: append-only segment files of lines (one entry
// per line, no newline inside an entry), fsync'd on every append, replayed oldest first.
//
// Size bound: when an append would pass maxBytes it is refused (the spool keeps the OLDEST data and the
// caller drops the newest, loudly). Why oldest: the spool then stays one unbroken prefix of the stream, so
// the gap is a single time range at the end, which the caller logs and which a replay of the raw archive
// fills; dropping the oldest instead would punch a hole the operator cannot see from the database side.
//
// Crash behaviour: a segment is removed only after all its lines were delivered; a crash in between
// re-delivers that segment's delivered part, which is harmless because the sinks' writes are idempotent
// (same series and timestamp overwrite). A line cut short by a crash (no trailing newline) is dropped.
import { mkdir, open, readdir, readFile, rm, type FileHandle } from 'node:fs/promises';
import { join } from 'node:path';
import { ReefdError } from '../../libs/contract/index.js';

export interface SpoolOptions {
  dir: string;
  maxBytes: number;
  /** A segment is closed for writing past this size (default 4 MiB); one segment is read into memory at a time. */
  segmentBytes?: number;
}

interface Segment {
  seq: number;
  path: string;
  bytes: number;
  lines: number;
  /** No more appends (full, or a failed write may have left a fragment at its end). */
  sealed: boolean;
}

const SEGMENT = /^seg-(\d{12})\.spool$/;
const NL = 0x0a;

function countLines(buf: Buffer): number {
  let n = 0;
  for (let i = buf.indexOf(NL); i !== -1; i = buf.indexOf(NL, i + 1)) n++;
  return n;
}

function diskError(err: unknown, dir: string): Error {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  if (code === 'ENOSPC' || code === 'EDQUOT') {
    return new ReefdError(
      'REEFD_DISK_FULL',
      `No space left for the sink spool in ${dir}; free space there.`,
      {
        retriable: true,
        detail: { path: dir },
        cause: err,
      },
    );
  }
  return err instanceof Error ? err : new Error(String(err));
}

export class Spool {
  readonly #dir: string;
  readonly #maxBytes: number;
  readonly #segmentBytes: number;
  #segments: Segment[] = [];
  #writer: FileHandle | undefined;
  #nextSeq = 1;
  #bytes = 0;
  #lines = 0;
  /** Lines of the oldest segment, loaded for delivery, and how many of them are delivered. */
  #readLines: string[] | undefined;
  #readPos = 0;

  private constructor(o: SpoolOptions) {
    this.#dir = o.dir;
    this.#maxBytes = o.maxBytes;
    this.#segmentBytes = o.segmentBytes ?? 4 * 1024 * 1024;
  }

  /** Opens the folder and counts what an earlier run left in it. */
  static async open(o: SpoolOptions): Promise<Spool> {
    const s = new Spool(o);
    await mkdir(o.dir, { recursive: true });
    const names = (await readdir(o.dir)).filter((n) => SEGMENT.test(n)).sort();
    for (const name of names) {
      const path = join(o.dir, name);
      const buf = await readFile(path);
      const seq = Number(SEGMENT.exec(name)?.[1]);
      if (buf.length === 0) {
        await rm(path, { force: true });
        continue;
      }
      s.#segments.push({ seq, path, bytes: buf.length, lines: countLines(buf), sealed: true });
      s.#bytes += buf.length;
      s.#lines += countLines(buf);
      s.#nextSeq = seq + 1;
    }
    return s;
  }

  bytes(): number {
    return this.#bytes;
  }

  /** Entries waiting (not yet delivered). */
  lines(): number {
    return this.#lines - this.#readPos;
  }

  maxBytes(): number {
    return this.#maxBytes;
  }

  isEmpty(): boolean {
    return this.lines() === 0;
  }

  /** True at 80 % of the bound or above: time to raise an alert. */
  nearLimit(): boolean {
    return this.#bytes >= 0.8 * this.#maxBytes;
  }

  /**
   * Appends the entries in one write and one fsync. Returns false, writing nothing, when they would pass
   * the size bound; throws REEFD_DISK_FULL (retriable) when the disk is full.
   */
  async append(entries: readonly string[]): Promise<boolean> {
    if (entries.length === 0) return true;
    const data = Buffer.from(entries.join('\n') + '\n', 'utf8');
    if (this.#bytes + data.length > this.#maxBytes) return false;
    try {
      let seg = this.#segments.at(-1);
      if (this.#writer === undefined || seg === undefined || seg.sealed || seg.bytes >= this.#segmentBytes) {
        await this.#writer?.close();
        this.#writer = undefined;
        const seq = this.#nextSeq++;
        const path = join(this.#dir, `seg-${String(seq).padStart(12, '0')}.spool`);
        this.#writer = await open(path, 'a');
        seg = { seq, path, bytes: 0, lines: 0, sealed: false };
        this.#segments.push(seg);
      }
      let off = 0;
      while (off < data.length) off += (await this.#writer.write(data, off)).bytesWritten;
      await this.#writer.sync();
      seg.bytes += data.length;
      seg.lines += entries.length;
      this.#bytes += data.length;
      this.#lines += entries.length;
      return true;
    } catch (err) {
      // The segment may now end in a partial entry; stop appending to it (the reader drops the fragment).
      await this.#writer?.close().catch(() => undefined);
      this.#writer = undefined;
      const last = this.#segments.at(-1);
      if (last !== undefined) last.sealed = true;
      throw diskError(err, this.#dir);
    }
  }

  /** Up to `max` of the oldest undelivered entries (an empty array when the spool is empty). */
  async peek(max: number): Promise<string[]> {
    for (;;) {
      const seg = this.#segments[0];
      if (seg === undefined) return [];
      if (this.#readLines === undefined) {
        if (seg === this.#segments.at(-1) && this.#writer !== undefined) {
          // Reading the segment being written: close it for writing first, so it no longer grows.
          await this.#writer.close();
          this.#writer = undefined;
        }
        seg.sealed = true;
        const text = await readFile(seg.path, 'utf8');
        const parts = text.split('\n');
        parts.pop(); // after the last newline: '' or a fragment cut short by a crash
        this.#readLines = parts;
        this.#readPos = 0;
        // Account for a dropped fragment so the line count stays true.
        this.#lines -= seg.lines - parts.length;
        seg.lines = parts.length;
      }
      if (this.#readPos < this.#readLines.length)
        return this.#readLines.slice(this.#readPos, this.#readPos + max);
      await this.#dropHead();
    }
  }

  /** Marks the first `n` entries of the last peek as delivered; a segment fully delivered is removed. */
  async commit(n: number): Promise<void> {
    if (this.#readLines === undefined) return;
    this.#readPos = Math.min(this.#readPos + n, this.#readLines.length);
    if (this.#readPos >= this.#readLines.length) await this.#dropHead();
  }

  async #dropHead(): Promise<void> {
    const seg = this.#segments.shift();
    if (seg === undefined) return;
    await rm(seg.path, { force: true });
    this.#bytes -= seg.bytes;
    this.#lines -= seg.lines;
    this.#readLines = undefined;
    this.#readPos = 0;
  }

  async close(): Promise<void> {
    await this.#writer?.close();
    this.#writer = undefined;
  }
}
