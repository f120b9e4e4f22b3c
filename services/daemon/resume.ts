// Restart resume: the archive lines received after the last checkpoint are fed to the processor again, so
// its windows hold everything the archive holds. Lines the checkpoint already covered are recognised by
// the processor's duplicate detection (same sensor and time), so starting at the checkpoint's last receive
// time (inclusive) is safe. Without a checkpoint (a kill before the first one, or a damaged one) but with an
// archive, every archive line is fed again: records of acknowledged messages that were still in a sink's
// memory at the kill are rebuilt, and the station state (e.g. the CTD an oxygen record needs) comes back.
import { basename } from 'node:path';
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import { messageFromArchiveLine, type Processor } from '../../libs/processor/index.js';
import { listArchiveFiles, readArchive } from '../archive/index.js';
import { redeliveryKey } from './pipeline.js';

export interface ResumeResult {
  /** Content keys of the lines read (the newest keepKeys), so redeliveries of them are recognised. */
  keys: string[];
  lines: number;
  records: DerivedRecord[];
  lastRxMs: number | undefined;
}

export async function replayArchiveTail(
  archiveDir: string,
  sinceRxMs: number | undefined,
  config: ReefdConfig,
  processor: Processor,
  maxRecords = 200_000,
  keepKeys = 50_000,
): Promise<ResumeResult> {
  const out: ResumeResult = { keys: [], lines: 0, records: [], lastRxMs: sinceRxMs };
  let files: string[];
  try {
    files = await listArchiveFiles(archiveDir);
  } catch {
    return out;
  }
  const sinceDay = sinceRxMs === undefined ? '' : new Date(sinceRxMs).toISOString().slice(0, 10);
  for (const file of files) {
    const day = /^raw-(\d{4}-\d{2}-\d{2})\./.exec(basename(file))?.[1];
    if (day !== undefined && day < sinceDay) continue;
    for await (const e of readArchive(file)) {
      if (e.line === null) continue;
      const rx = Date.parse(e.line.rx);
      if (sinceRxMs !== undefined && !(rx >= sinceRxMs)) continue;
      if (!Number.isFinite(rx)) continue;
      out.lines++;
      out.lastRxMs = rx;
      out.keys.push(redeliveryKey(e.line.topic, '', e.line.msg));
      if (out.keys.length > 2 * keepKeys) out.keys.splice(0, out.keys.length - keepKeys);
      const input = messageFromArchiveLine(config, e.line);
      if (!input.ok) continue;
      const r = processor.push(input.message, input.rxMs);
      if (out.records.length < maxRecords) out.records.push(...r.records);
    }
  }
  if (out.keys.length > keepKeys) out.keys.splice(0, out.keys.length - keepKeys);
  return out;
}
