// `reefd replay --config FILE --input ARCHIVE [--out FILE] [--from ISO] [--to ISO]`: the live pipeline's
// processor over a raw archive. Output: derived records as NDJSON (stdout by default). Deterministic: the same
// archive and configuration give byte-identical output. Lab results received after their windows closed are
// replayed at their event time (services/replay/ordered.ts), so they are used like bottles that came in time.
// A range replays the messages of [from - warm-up, to + the windows' closing time) and writes the records
// whose time is in [from, to): the warm-up gives the windows, the storage term and the QC tests the history
// they read, so the records in range are those of a full replay. The configuration's calibration_file and
// logbook_file (beside it) apply as they do live; the archive is only read.
import { createWriteStream, existsSync, type WriteStream } from 'node:fs';
import path from 'node:path';
import {
  createProcessor,
  inRangeWithMargins,
  messageFromArchiveLine,
  rangeMargins,
} from '../../../libs/processor/index.js';
import {
  formatProblem,
  type DerivedRecord,
  type ReefdConfig,
  type SensorMessage,
} from '../../../libs/contract/index.js';
import { readArchiveOrdered, type OrderedStats } from '../../replay/ordered.js';
import { describeFieldFiles, loadFieldFiles, type FieldFiles } from '../../config/field-files.js';
import { loadConfigFile } from '../../config/load.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CommandRun } from '../io.js';
import { parseCommand } from '../args.js';

const HELP = `Usage: reefd replay --config FILE --input ARCHIVE [--out FILE] [options]

Reprocesses a raw archive (one .ndjson or .ndjson.gz file, or a folder of them, read in day order)
with the configuration given, and writes the derived records as NDJSON to FILE or stdout.

Options:
  --config FILE     site configuration (required)
  --input PATH      archive file or folder (required)
  --out FILE        output file (default: stdout)
  --from ISO        only records from this time (ISO 8601 with zone; event time)
  --to ISO          only records before this time
  --flush-tail      also compute the windows still open at the end of the archive (the live
                    daemon would compute them once later data arrives)
  --quiet           no progress or summary on stderr
  --summary-json F  write the summary as JSON to F
`;

export interface ReplaySummary {
  lines: number;
  unreadable: number;
  accepted: number;
  rejected: number;
  rejectsByReason: Record<string, number>;
  duplicates: number;
  late: number;
  recordsByType: Record<string, number>;
  records: number;
  /** Lab results received after their windows had closed, replayed at their own time. */
  lateSamplesMoved: number;
  /** Messages outside the range (and its warm-up) that were not processed. */
  outOfRange: number;
  /** Records built from values the calibration file corrected (`calibrated: true`). */
  calibrated: number;
  interrupted: boolean;
  seconds: number;
}

/** Writes lines to a stream in large chunks, honouring back-pressure. */
class ChunkWriter {
  #parts: string[] = [];
  #size = 0;
  constructor(private readonly out: NodeJS.WritableStream) {}
  async line(s: string): Promise<void> {
    this.#parts.push(s, '\n');
    this.#size += s.length + 1;
    if (this.#size >= 1 << 16) await this.flush();
  }
  async flush(): Promise<void> {
    if (this.#size === 0) return;
    const chunk = this.#parts.join('');
    this.#parts = [];
    this.#size = 0;
    if (!this.out.write(chunk)) await new Promise<void>((r) => this.out.once('drain', () => r()));
  }
}

export const run: CommandRun = async (args, io) => {
  const parsed = parseCommand(
    'replay',
    args,
    {
      config: { type: 'string' },
      input: { type: 'string' },
      out: { type: 'string' },
      'flush-tail': { type: 'boolean', default: false },
      from: { type: 'string' },
      to: { type: 'string' },
      quiet: { type: 'boolean', default: false },
      'summary-json': { type: 'string' },
    },
    HELP,
    io,
  );
  if (!parsed.ok) return parsed.exit;
  const values = parsed.values;
  if (!values.config || !values.input) {
    io.stderr(`reefd replay: --config and --input are required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  if (!existsSync(values.input)) {
    io.stderr(`reefd replay: input ${values.input} does not exist\n`);
    return EXIT_USAGE;
  }
  let cfg;
  try {
    cfg = await loadConfigFile(values.config);
  } catch (err) {
    io.stderr(`reefd replay: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  if (!cfg.ok) {
    for (const p of cfg.problems) io.stderr(`${values.config}: ${formatProblem(p)}\n`);
    return EXIT_USAGE;
  }
  const config = cfg.config;
  const quiet = values.quiet ?? false;
  const range = parseRange(values.from, values.to);
  if (typeof range === 'string') {
    io.stderr(`reefd replay: ${range}\n`);
    return EXIT_USAGE;
  }
  const bounds = rangeBounds(config, range);
  // The calibration file and the logbook beside the configuration apply as they do live.
  let field: FieldFiles;
  try {
    field = await loadFieldFiles(path.dirname(path.resolve(values.config)), config);
  } catch (err) {
    io.stderr(`reefd replay: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }

  let fileOut: WriteStream | undefined;
  let out: NodeJS.WritableStream = process.stdout;
  if (values.out) {
    fileOut = createWriteStream(values.out, { flags: 'w' });
    out = fileOut;
  }
  const writer = new ChunkWriter(out);
  const processor = createProcessor(config, undefined, field.options);
  const fieldLine = describeFieldFiles(field);
  if (!quiet && fieldLine !== undefined) io.stderr(`replay: ${fieldLine}\n`);
  const summary: ReplaySummary = {
    lines: 0,
    unreadable: 0,
    accepted: 0,
    rejected: 0,
    rejectsByReason: {},
    duplicates: 0,
    late: 0,
    recordsByType: {},
    records: 0,
    lateSamplesMoved: 0,
    outOfRange: 0,
    calibrated: 0,
    interrupted: false,
    seconds: 0,
  };
  let stop = false;
  const onSignal = () => {
    stop = true;
  };
  process.once('SIGTERM', onSignal);
  process.once('SIGINT', onSignal);

  const started = performance.now();
  let lastProgress = started;
  const reject = (reason: string) => {
    summary.rejected++;
    const short = reason.split(':')[0] ?? reason;
    summary.rejectsByReason[short] = (summary.rejectsByReason[short] ?? 0) + 1;
  };
  const emit = async (records: readonly DerivedRecord[]) => {
    for (const r of records) {
      if (range.fromMs !== undefined || range.toMs !== undefined) {
        const t = Date.parse(r.t);
        if ((range.fromMs !== undefined && t < range.fromMs) || (range.toMs !== undefined && t >= range.toMs))
          continue;
      }
      summary.records++;
      summary.recordsByType[r.type] = (summary.recordsByType[r.type] ?? 0) + 1;
      if (r.calibrated === true) summary.calibrated++;
      await writer.line(JSON.stringify(r));
    }
  };

  try {
    const ordered: OrderedStats = { lateSamples: 0, lateSamplesUnmoved: 0 };
    const stream = readArchiveOrdered(
      values.input,
      {
        topicPrefix: config.topic_prefix,
        latenessMs: config.processing.lateness_min * 60_000,
        shouldStop: () => stop,
        ...(bounds.stopAfterRxMs !== undefined ? { stopAfterRxMs: bounds.stopAfterRxMs } : {}),
      },
      ordered,
    );
    for await (const entry of stream) {
      if (stop) {
        summary.interrupted = true;
        break;
      }
      summary.lines++;
      if (entry.line === null) {
        summary.unreadable++;
        continue;
      }
      const input = messageFromArchiveLine(config, entry.line);
      if (!input.ok) {
        reject(input.reason);
        continue;
      }
      if (!bounds.inRange(input.message)) {
        summary.outOfRange++;
        continue;
      }
      summary.accepted++;
      const r = processor.push(input.message, input.rxMs);
      if (r.status === 'duplicate') summary.duplicates++;
      if (r.late) summary.late++;
      await emit(r.records);
      if (!quiet && (summary.lines & 1023) === 0) {
        const now = performance.now();
        if (now - lastProgress > 2000) {
          lastProgress = now;
          const rate = Math.round(summary.lines / ((now - started) / 1000));
          const msg2 = `replay: ${summary.lines} lines, ${summary.records} records, ${rate} lines/s`;
          io.stderr(io.isTty ? `\r${msg2}   ` : `${msg2}\n`);
        }
      }
    }
    summary.lateSamplesMoved = ordered.lateSamples;
    // With --to, the windows before `to` are closed from the data read (the archive may go on).
    if ((values['flush-tail'] || range.toMs !== undefined) && !summary.interrupted)
      await emit(processor.drain());
    await writer.flush();
  } catch (err) {
    io.stderr(`reefd replay: ${(err as Error).message}\n`);
    await writer.flush();
    if (fileOut) await new Promise<void>((r) => fileOut.end(() => r()));
    return EXIT_FAILURE;
  } finally {
    process.off('SIGTERM', onSignal);
    process.off('SIGINT', onSignal);
  }
  if (fileOut) await new Promise<void>((r) => fileOut.end(() => r()));
  summary.seconds = (performance.now() - started) / 1000;
  if (values['summary-json']) {
    const { writeFile } = await import('node:fs/promises');
    await writeFile(values['summary-json'], JSON.stringify(summary, null, 2) + '\n');
  }
  if (!quiet) {
    const by = (o: Record<string, number>) =>
      Object.entries(o)
        .sort()
        .map(([k, n]) => `${k} ${n}`)
        .join(', ') || 'none';
    io.stderr(
      `${io.isTty ? '\n' : ''}replay ${summary.interrupted ? 'interrupted' : 'done'}: ${summary.lines} lines read ` +
        `(${summary.unreadable} unreadable), ${summary.accepted} accepted, ${summary.rejected} rejected ` +
        `(${by(summary.rejectsByReason)}), ${summary.duplicates} duplicates, ${summary.late} late, ` +
        `${summary.lateSamplesMoved} late lab results replayed at their time` +
        `${summary.outOfRange > 0 ? `, ${summary.outOfRange} outside the range` : ''}; ` +
        `${summary.records} records (${by(summary.recordsByType)})` +
        `${summary.calibrated > 0 ? `, ${summary.calibrated} calibrated` : ''} in ${summary.seconds.toFixed(1)} s\n`,
    );
  }
  return summary.interrupted ? EXIT_FAILURE : EXIT_OK;
};

interface Range {
  fromMs?: number;
  toMs?: number;
}

const ISO_WITH_ZONE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/;

/** --from and --to as ms, or the reason they are not usable. */
export function parseRange(from: string | undefined, to: string | undefined): Range | string {
  const out: Range = {};
  for (const [name, v] of [
    ['from', from],
    ['to', to],
  ] as const) {
    if (v === undefined) continue;
    const ms = Date.parse(v);
    if (!ISO_WITH_ZONE.test(v) || !Number.isFinite(ms))
      return `--${name} ${v} is not an ISO 8601 time with a zone (e.g. 2026-07-14T00:00:00Z)`;
    if (name === 'from') out.fromMs = ms;
    else out.toMs = ms;
  }
  if (out.fromMs !== undefined && out.toMs !== undefined && out.fromMs >= out.toMs)
    return `--from ${from} must be before --to ${to}`;
  return out;
}

/**
 * Which messages a range needs (libs/processor range.ts: the warm-up before `from` and the closing time after
 * `to`), and when reading may stop: a day after the closing time in receive time.
 */
export function rangeBounds(
  config: ReefdConfig,
  range: Range,
): { inRange: (m: SensorMessage) => boolean; stopAfterRxMs?: number } {
  const margins = rangeMargins(config);
  const from = range.fromMs ?? Number.NEGATIVE_INFINITY;
  const to = range.toMs ?? Number.POSITIVE_INFINITY;
  const out: { inRange: (m: SensorMessage) => boolean; stopAfterRxMs?: number } = {
    inRange: inRangeWithMargins(margins, from, to),
  };
  if (range.toMs !== undefined) out.stopAfterRxMs = range.toMs + margins.tailMs + 24 * 3_600_000;
  return out;
}
