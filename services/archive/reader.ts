// Reads raw archive files (contract section 2): plain or gzip, one file or a folder (sorted by name, which
// is by day). Tolerant: a line that does not parse (e.g. cut short by a crash) is reported and skipped.
import { createReadStream } from 'node:fs';
import { readdir, stat } from 'node:fs/promises';
import { basename, join } from 'node:path';
import { createInterface } from 'node:readline';
import type { Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { parseArchiveLine, ReefdError, type ArchiveLine } from '../../libs/contract/index.js';
import { ARCHIVE_FILE } from './files.js';

export interface ArchiveEntry {
  line: ArchiveLine | null;
  /** 1-based line number in its file. */
  lineNo: number;
  file: string;
  /** Why `line` is null: `json_syntax`, `bad_archive_line:<path>`, or `gzip:<message>` for a damaged gz. */
  error?: string;
}

/** The archive files of a folder in reading order; for a day present as both plain and gz, the gz. */
export async function listArchiveFiles(dir: string): Promise<string[]> {
  const names = (await readdir(dir)).filter((n) => ARCHIVE_FILE.test(n));
  const set = new Set(names);
  return names
    .filter((n) => n.endsWith('.gz') || !set.has(`${n}.gz`))
    .sort()
    .map((n) => join(dir, n));
}

async function* readFile(file: string): AsyncGenerator<ArchiveEntry> {
  let input: Readable = createReadStream(file);
  if (file.endsWith('.gz')) input = input.pipe(createGunzip());
  let streamError: Error | undefined;
  const rl = createInterface({ input, crlfDelay: Infinity });
  input.on('error', (err: Error) => {
    streamError = err;
    rl.close();
  });
  let lineNo = 0;
  const name = basename(file);
  try {
    for await (const text of rl) {
      lineNo++;
      if (text.trim() === '') continue;
      const r = parseArchiveLine(text);
      if (r.ok) yield { line: r.line, lineNo, file: name };
      else yield { line: null, lineNo, file: name, error: r.reason };
    }
  } catch (err) {
    streamError = err as Error;
  }
  if (streamError !== undefined)
    yield { line: null, lineNo: lineNo + 1, file: name, error: `gzip:${streamError.message}` };
}

/** Every line of a raw archive file or folder, in order. */
export async function* readArchive(pathOrDir: string): AsyncGenerator<ArchiveEntry> {
  let st;
  try {
    st = await stat(pathOrDir);
  } catch (err) {
    throw new ReefdError('REEFD_INPUT_MISSING', `The archive "${pathOrDir}" does not exist.`, {
      detail: { path: pathOrDir },
      cause: err,
    });
  }
  const files = st.isDirectory() ? await listArchiveFiles(pathOrDir) : [pathOrDir];
  for (const f of files) yield* readFile(f);
}
