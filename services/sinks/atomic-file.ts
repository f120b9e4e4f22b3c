// One atomic file write for the services: a crash leaves the old or the new content, never a mix.
import { mkdir, open, readFile, rename, rm } from 'node:fs/promises';
import path from 'node:path';

/**
 * Pieces are written in batches of about this many characters (one encode and one write each; a handle's
 * writeFile continues at its position and writes the whole batch).
 */
const BATCH_CHARS = 1 << 20;

/**
 * Replaces `file` with `text` (bytes, or the concatenation of its pieces, written a batch at a time so no step
 * encodes the whole of a large file at once): a temp file (mode 0600), fsync, rename, fsync of the folder.
 * Used for the checkpoint, the dashboard history and the outputs' delivery ledgers.
 */
export async function writeFileAtomic(
  file: string,
  text: string | Uint8Array | readonly string[],
): Promise<void> {
  await mkdir(path.dirname(file), { recursive: true });
  const tmp = `${file}.tmp-${process.pid}`;
  const fh = await open(tmp, 'w', 0o600);
  try {
    if (typeof text === 'string' || text instanceof Uint8Array) await fh.writeFile(text);
    else {
      let batch: string[] = [];
      let chars = 0;
      for (const piece of text) {
        batch.push(piece);
        chars += piece.length;
        if (chars >= BATCH_CHARS) {
          await fh.writeFile(batch.join(''));
          batch = [];
          chars = 0;
        }
      }
      if (batch.length > 0) await fh.writeFile(batch.join(''));
    }
    await fh.sync();
  } catch (err) {
    // A full disk: the partial temp file would only keep the space taken.
    await fh.close().catch(() => undefined);
    await rm(tmp, { force: true }).catch(() => undefined);
    throw err;
  }
  await fh.close();
  await rename(tmp, file);
  const dir = await open(path.dirname(file), 'r');
  try {
    await dir.sync();
  } finally {
    await dir.close();
  }
}

/** The JSON content of `file`, or undefined when it is missing or unreadable (a ledger is rebuilt then). */
export async function readJsonFile(file: string): Promise<unknown> {
  try {
    return JSON.parse(await readFile(file, 'utf8')) as unknown;
  } catch {
    return undefined;
  }
}
