// The archive reader's fuzz property (shared by archive.test.ts and regressions.test.ts).
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { expect } from 'vitest';
import { readArchive, type ArchiveEntry } from '../../../services/archive/index.js';

const dir = mkdtempSync(join(tmpdir(), 'reefd-fuzz-archive-'));
export function readerCleanup(): void {
  rmSync(dir, { recursive: true, force: true });
}
let n = 0;

export interface ReaderInput {
  /** Hex bytes of a plain archive file. */
  plainHex?: string;
  /** Lines gzipped, then cut to `cut` bytes (or with byte `flip` inverted). */
  lines?: string[];
  cut?: number;
  flip?: number;
}

async function readAll(file: string): Promise<ArchiveEntry[]> {
  const out: ArchiveEntry[] = [];
  for await (const e of readArchive(file)) out.push(e);
  return out;
}

/** The reader never throws; from a damaged gz it returns a prefix of the lines and reports the damage. */
export async function readerProperty(i: ReaderInput): Promise<void> {
  if (i.plainHex !== undefined) {
    const f = join(dir, `raw-2026-12-0${(n++ % 9) + 1}.ndjson`);
    writeFileSync(f, Buffer.from(i.plainHex, 'hex'));
    const entries = await readAll(f);
    for (const e of entries) if (e.line === null) expect(e.error).toMatch(/^(json_syntax|bad_archive_line:)/);
    return;
  }
  const lines = i.lines ?? [];
  let gz = gzipSync(Buffer.from(lines.map((l) => `${l}\n`).join('')));
  if (i.cut !== undefined) gz = gz.subarray(0, i.cut % (gz.length + 1));
  if (i.flip !== undefined && gz.length > 0) {
    gz = Buffer.from(gz);
    const k = i.flip % gz.length;
    gz[k] = (gz[k] as number) ^ 0xff;
  }
  const f = join(dir, `raw-2026-11-${String((n++ % 28) + 1).padStart(2, '0')}.ndjson.gz`);
  writeFileSync(f, gz);
  const entries = await readAll(f);
  const good = entries.filter((e) => e.line !== null).map((e) => JSON.stringify(e.line));
  if (i.flip === undefined) {
    // A cut gz: whatever it yields is the start of what was written, in order.
    const want = lines.slice(0, good.length).map((l) => JSON.stringify(JSON.parse(l)));
    expect(good).toEqual(want);
    if (i.cut !== undefined && good.length < lines.length)
      expect(entries.some((e) => e.error?.startsWith('gzip:'))).toBe(true);
  }
}
