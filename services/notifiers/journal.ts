// Append-only JSON-lines journal, fsynced before a write resolves. Compaction writes a new file next to it, fsyncs
// it, renames it over the old one and fsyncs the folder, so a crash leaves either the old or the new journal.
// A torn last line (crash mid-write) is skipped on read.

import { mkdir, open, readFile, rename, stat, type FileHandle } from 'node:fs/promises';
import { dirname } from 'node:path';
import { NOTIFY_ERRORS } from './errors.js';

export class Journal {
  readonly path: string;
  #fh: FileHandle | null = null;
  #chain: Promise<void> = Promise.resolve();
  #lines = 0;

  constructor(path: string) {
    this.path = path;
  }

  /** Lines appended since open or the last compaction (a compaction trigger). */
  get lines(): number {
    return this.#lines;
  }

  async open(): Promise<void> {
    await mkdir(dirname(this.path), { recursive: true });
    this.#fh = await open(this.path, 'a');
  }

  /** Appends records as one write and fsyncs; calls are serialised in call order. */
  append(records: readonly object[]): Promise<void> {
    if (records.length === 0) return this.#chain;
    const text = records.map((r) => JSON.stringify(r)).join('\n') + '\n';
    const run = async (): Promise<void> => {
      const fh = this.#fh;
      if (fh === null)
        throw NOTIFY_ERRORS.error(
          'REEFD_NOTIFY_JOURNAL_CLOSED',
          `${this.path} is not open; call start() first`,
        );
      await fh.appendFile(text, 'utf8');
      await fh.sync();
      this.#lines += records.length;
    };
    const p = this.#chain.then(run);
    this.#chain = p.catch(() => undefined);
    return p;
  }

  /** Replaces the journal with `records` (crash-safe). */
  compact(records: readonly object[]): Promise<void> {
    const run = async (): Promise<void> => {
      const tmp = `${this.path}.tmp`;
      const out = await open(tmp, 'w');
      try {
        await out.writeFile(records.map((r) => JSON.stringify(r) + '\n').join(''), 'utf8');
        await out.sync();
      } finally {
        await out.close();
      }
      await this.#fh?.close();
      await rename(tmp, this.path);
      await fsyncDir(dirname(this.path));
      this.#fh = await open(this.path, 'a');
      this.#lines = 0;
    };
    const p = this.#chain.then(run);
    this.#chain = p.catch(() => undefined);
    return p;
  }

  async close(): Promise<void> {
    await this.#chain;
    await this.#fh?.close();
    this.#fh = null;
  }
}

async function fsyncDir(dir: string): Promise<void> {
  const d = await open(dir, 'r');
  try {
    await d.sync();
  } finally {
    await d.close();
  }
}

/** Reads the records of a journal from byte `offset` (missing file: none). Returns the new end offset. */
export async function readJournal(path: string, offset = 0): Promise<{ records: unknown[]; end: number }> {
  let size: number;
  try {
    size = (await stat(path)).size;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return { records: [], end: 0 };
    throw err;
  }
  if (size <= offset) return { records: [], end: size < offset ? 0 : offset };
  const buf = await readFile(path);
  const text = buf.subarray(offset).toString('utf8');
  const complete = text.lastIndexOf('\n');
  const records: unknown[] = [];
  if (complete < 0) return { records, end: offset };
  for (const line of text.slice(0, complete).split('\n')) {
    if (line.trim() === '') continue;
    try {
      records.push(JSON.parse(line));
    } catch {
      // a torn or foreign line: skip it rather than lose the rest of the journal
    }
  }
  return { records, end: offset + Buffer.byteLength(text.slice(0, complete + 1), 'utf8') };
}
