// Gzip of a closed archive day. Crash-safe ordering: stream to `<name>.gz.tmp`, fsync it, rename it to
// `<name>.gz` (atomic), fsync the folder, and only then remove the plain file. A crash at any point leaves
// either the complete plain file, or a complete gz (plus possibly the plain file, removed on the next start).
import { createReadStream, createWriteStream } from 'node:fs';
import { open, rename, rm, readdir } from 'node:fs/promises';
import { join } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { createGzip } from 'node:zlib';
import { ARCHIVE_FILE } from './files.js';

async function fsyncPath(path: string): Promise<void> {
  const fh = await open(path, 'r');
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/** Compresses `dir/name` (a plain `.ndjson`) to `dir/name.gz` and removes the plain file. */
export async function compressFile(dir: string, name: string): Promise<void> {
  const plain = join(dir, name);
  const tmp = `${plain}.gz.tmp`;
  await pipeline(createReadStream(plain), createGzip({ level: 6 }), createWriteStream(tmp));
  await fsyncPath(tmp);
  await rename(tmp, `${plain}.gz`);
  await fsyncPath(dir);
  await rm(plain);
}

/**
 * Start-up repair: removes half-written `.gz.tmp` files, and plain files whose `.gz` is already complete
 * (a crash between rename and remove). Returns the names removed.
 */
export async function repairArchiveDir(dir: string): Promise<string[]> {
  const names = await readdir(dir);
  const set = new Set(names);
  const removed: string[] = [];
  for (const name of names) {
    if (
      name.endsWith('.ndjson.gz.tmp') ||
      (ARCHIVE_FILE.test(name) && !name.endsWith('.gz') && set.has(`${name}.gz`))
    ) {
      await rm(join(dir, name), { force: true });
      removed.push(name);
    }
  }
  return removed;
}
