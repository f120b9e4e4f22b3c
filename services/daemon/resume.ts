// Restart resume: the archive lines after the checkpoint's cursor (cursor.ts) go through the pipeline's
// processor stage again, in archive order, so the windows hold everything the archive holds and each record
// is numbered as it was the first time; every sink skips the positions it already has. Without a checkpoint
// (a first start, a damaged one) the cursor is at the start and every line is fed.
import { basename } from 'node:path';
import type { ReefdConfig } from '../../libs/contract/index.js';
import { messageFromArchiveLine } from '../../libs/processor/index.js';
import { listArchiveFiles, readArchive } from '../archive/index.js';
import { covers, type ArchiveCursor } from './cursor.js';
import { archivedKey, type Pipeline } from './pipeline.js';

export interface ResumeResult {
  /** Content keys of the lines read (the newest keepKeys), so redeliveries of them are recognised. */
  keys: string[];
  /** Lines fed to the processor again. */
  lines: number;
  /** Records they gave (all of them numbered; the sinks skip what they hold). */
  records: number;
}

export async function resumeFromArchive(
  archiveDir: string,
  cursor: ArchiveCursor,
  config: ReefdConfig,
  pipeline: Pipeline,
  positions: () => number,
  keepKeys = 50_000,
): Promise<ResumeResult> {
  const out: ResumeResult = { keys: [], lines: 0, records: 0 };
  let files: string[];
  try {
    files = await listArchiveFiles(archiveDir);
  } catch {
    return out;
  }
  const from = positions();
  const startDay = cursor.rxMs === undefined ? '' : new Date(cursor.rxMs).toISOString().slice(0, 10);
  let atRxMs = Number.NaN;
  let nth = 0;
  for (const file of files) {
    const day = /^raw-(\d{4}-\d{2}-\d{2})\./.exec(basename(file))?.[1];
    if (day !== undefined && day < startDay) continue;
    for await (const e of readArchive(file)) {
      if (e.line === null) continue; // a line cut short by a crash: never acknowledged, never processed
      const rx = Date.parse(e.line.rx);
      if (!Number.isFinite(rx)) continue;
      nth = rx === atRxMs ? nth + 1 : 1;
      atRxMs = rx;
      // Keys of the lines just before the cursor too: the broker may redeliver those.
      out.keys.push(archivedKey(e.line.topic, e.line.msg));
      if (out.keys.length > 2 * keepKeys) out.keys.splice(0, out.keys.length - keepKeys);
      if (covers(cursor, rx, nth)) continue;
      out.lines++;
      // The live run's own verdict is in the line: a rejected line stays rejected, whatever a re-validation
      // of its stored form would say (invalid UTF-8 is stored repaired).
      const input = e.line.reject === undefined ? messageFromArchiveLine(config, e.line) : undefined;
      await pipeline.deliverArchived(input?.ok === true ? input.message : undefined, rx);
    }
  }
  if (out.keys.length > keepKeys) out.keys.splice(0, out.keys.length - keepKeys);
  out.records = positions() - from;
  return out;
}
