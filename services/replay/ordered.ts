// Reading a raw archive for replay in event-time order where it matters (docs/contract-v1.md, replay): the
// archive is in receive order, and lab results (`sample` messages) may be received weeks after their time,
// long after the processor has closed their windows. Design, chosen for bounded memory on long archives:
//   - pass 1 reads the archive's text once and parses only lines whose topic is a `sample` topic; a sample
//     received more than the processor's lateness after its time is noted (its file and line, and the
//     line itself: bottle results are a few hundred bytes, and a deployment has hundreds to thousands);
//   - pass 2 streams the archive as before, skips the noted lines, and yields each noted sample just
//     before the first message whose time is after the sample's, i.e. where it would have been had it
//     arrived on time.
// Every other message keeps its receive order, so an archive without late samples replays exactly as
// before (and as the live run derived it); the processor's own hold (processing.reorder_min) orders
// messages within the lateness. An external sort of everything was the alternative: it would change the
// derivation order of on-time messages (records would then differ from the live run's) for no gain.
// Memory: the noted samples, at most maxLateSamples (default 200,000, ~60 MB); past that the rest are
// replayed where they were received and counted, so the bound holds whatever the archive.
import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import { basename } from 'node:path';
import { createInterface } from 'node:readline';
import type { Readable } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { parseArchiveLine, parseTopic, type ArchiveLine } from '../../libs/contract/index.js';
import { listArchiveFiles, readArchive, type ArchiveEntry } from '../archive/index.js';

export interface OrderedOptions {
  topicPrefix: string;
  /** A sample received this long after its time is moved to its time (the processor's lateness). */
  latenessMs: number;
  maxLateSamples?: number;
  /** Lines received after this are not read (everything that can still matter came before). */
  stopAfterRxMs?: number;
  /** Polled while the first pass reads, so a signal stops a long archive promptly. */
  shouldStop?: () => boolean;
}

export interface OrderedStats {
  lateSamples: number;
  /** Late samples past the memory bound, replayed where they were received. */
  lateSamplesUnmoved: number;
}

interface Late {
  tMs: number;
  entry: ArchiveEntry;
}

async function* rawLines(file: string): AsyncGenerator<{ lineNo: number; text: string }> {
  let input: Readable = createReadStream(file);
  if (file.endsWith('.gz')) input = input.pipe(createGunzip());
  const rl = createInterface({ input, crlfDelay: Infinity });
  input.on('error', () => rl.close()); // a damaged gz: pass 2 reports it
  let lineNo = 0;
  try {
    for await (const text of rl) {
      lineNo++;
      yield { lineNo, text };
    }
  } catch {
    // reported by pass 2
  }
}

const eventMs = (line: ArchiveLine | null): number | undefined => {
  const t = (line?.msg as { t?: unknown } | null | undefined)?.t;
  if (typeof t !== 'string') return undefined;
  const ms = Date.parse(t);
  return Number.isFinite(ms) ? ms : undefined;
};

/** Pass 1: the late samples of the archive, sorted by event time (stable). */
async function findLateSamples(files: string[], opts: OrderedOptions, stats: OrderedStats): Promise<Late[]> {
  const late: Late[] = [];
  const max = opts.maxLateSamples ?? 200_000;
  const marker = '/sample/';
  for (const file of files) {
    const name = basename(file);
    for await (const { lineNo, text } of rawLines(file)) {
      if ((lineNo & 1023) === 0 && opts.shouldStop?.() === true) return late;
      if (!text.includes(marker)) continue;
      const r = parseArchiveLine(text);
      if (!r.ok || r.line.reject !== undefined) continue;
      const tp = parseTopic(r.line.topic, opts.topicPrefix);
      if (!tp.ok || tp.parts.kind !== 'sample') continue;
      const tMs = eventMs(r.line);
      const rxMs = Date.parse(r.line.rx);
      if (tMs === undefined || !Number.isFinite(rxMs) || rxMs - tMs <= opts.latenessMs) continue;
      if (late.length >= max) {
        stats.lateSamplesUnmoved++;
        continue;
      }
      late.push({ tMs, entry: { line: r.line, lineNo, file: name } });
    }
  }
  late.sort((a, b) => a.tMs - b.tMs);
  stats.lateSamples = late.length;
  return late;
}

/**
 * The archive's entries (file or folder, as readArchive) with late samples moved to their event time.
 * `stats` is filled as the reading goes.
 */
export async function* readArchiveOrdered(
  input: string,
  opts: OrderedOptions,
  stats: OrderedStats = { lateSamples: 0, lateSamplesUnmoved: 0 },
): AsyncGenerator<ArchiveEntry> {
  const st = await stat(input).catch(() => undefined);
  const files = st === undefined ? [] : st.isDirectory() ? await listArchiveFiles(input) : [input];
  const late = await findLateSamples(files, opts, stats);
  const moved = new Set(late.map((l) => `${l.entry.file}:${l.entry.lineNo}`));
  let next = 0;
  for await (const entry of readArchive(input)) {
    if (entry.line !== null && moved.has(`${entry.file}:${entry.lineNo}`)) continue;
    if (
      opts.stopAfterRxMs !== undefined &&
      entry.line !== null &&
      Date.parse(entry.line.rx) > opts.stopAfterRxMs
    )
      break;
    const t = eventMs(entry.line);
    if (t !== undefined) {
      while (next < late.length && (late[next] as Late).tMs <= t) yield (late[next++] as Late).entry;
    }
    yield entry;
  }
  while (next < late.length) yield (late[next++] as Late).entry;
}
