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
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';
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

const OPTIONS = {
  config: { type: 'string' },
  input: { type: 'string' },
  out: { type: 'string' },
  'flush-tail': { type: 'boolean', default: false },
  from: { type: 'string' },
  to: { type: 'string' },
  quiet: { type: 'boolean', default: false },
  'summary-json': { type: 'string' },
} as const;

interface ReplayOptions {
  configPath: string;
  input: string;
  out?: string;
  flushTail: boolean;
  from?: string;
  to?: string;
  quiet: boolean;
  summaryJson?: string;
}

/** What a replay reads: the configuration, the range and the field files beside the configuration. */
interface ReplayInputs {
  config: ReefdConfig;
  range: Range;
  field: FieldFiles;
}

export const run: CommandRun = async (args, io) => {
  const opts = parseOptions(args, io);
  if (typeof opts === 'number') return opts;
  const inputs = await loadInputs(opts, io);
  if (typeof inputs === 'number') return inputs;
  const bounds = rangeBounds(inputs.config, inputs.range);
  const fileOut = opts.out ? createWriteStream(opts.out, { flags: 'w' }) : undefined;
  const writer = new ChunkWriter(fileOut ?? process.stdout);
  const processor = createProcessor(inputs.config, undefined, inputs.field.options);
  const fieldLine = describeFieldFiles(inputs.field);
  if (!opts.quiet && fieldLine !== undefined) io.stderr(`replay: ${fieldLine}\n`);
  const summary = emptySummary();
  const stop = stopOnSignals();
  const started = performance.now();
  try {
    await replayArchive(
      { opts, inputs, bounds, processor, summary, writer, stop: stop.requested, started },
      io,
    );
    await writer.flush();
  } catch (err) {
    io.stderr(`reefd replay: ${(err as Error).message}\n`);
    await writer.flush();
    if (fileOut) await endStream(fileOut);
    return EXIT_FAILURE;
  } finally {
    stop.off();
  }
  if (fileOut) await endStream(fileOut);
  summary.seconds = (performance.now() - started) / 1000;
  await reportSummary(opts, summary, io);
  return summary.interrupted ? EXIT_FAILURE : EXIT_OK;
};

/** The options, checked: the options as given, or the exit code after saying what is wrong. */
function parseOptions(args: string[], io: CliIo): ReplayOptions | number {
  const parsed = parseCommand('replay', args, OPTIONS, HELP, io);
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
  return {
    configPath: values.config,
    input: values.input,
    flushTail: values['flush-tail'] ?? false,
    quiet: values.quiet ?? false,
    ...(values.out ? { out: values.out } : {}),
    ...(values.from !== undefined ? { from: values.from } : {}),
    ...(values.to !== undefined ? { to: values.to } : {}),
    ...(values['summary-json'] ? { summaryJson: values['summary-json'] } : {}),
  };
}

/** The configuration, the range and the field files, or the exit code after saying what is wrong. */
async function loadInputs(opts: ReplayOptions, io: CliIo): Promise<ReplayInputs | number> {
  let cfg;
  try {
    cfg = await loadConfigFile(opts.configPath);
  } catch (err) {
    io.stderr(`reefd replay: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  if (!cfg.ok) {
    for (const p of cfg.problems) io.stderr(`${opts.configPath}: ${formatProblem(p)}\n`);
    return EXIT_USAGE;
  }
  const range = parseRange(opts.from, opts.to);
  if (typeof range === 'string') {
    io.stderr(`reefd replay: ${range}\n`);
    return EXIT_USAGE;
  }
  // The calibration file and the logbook beside the configuration apply as they do live.
  try {
    const field = await loadFieldFiles(path.dirname(path.resolve(opts.configPath)), cfg.config);
    return { config: cfg.config, range, field };
  } catch (err) {
    io.stderr(`reefd replay: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
}

function emptySummary(): ReplaySummary {
  return {
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
}

/** One replay's parts, built by `run`. */
interface ReplayRun {
  opts: ReplayOptions;
  inputs: ReplayInputs;
  bounds: ReturnType<typeof rangeBounds>;
  processor: ReturnType<typeof createProcessor>;
  summary: ReplaySummary;
  writer: ChunkWriter;
  /** True once SIGTERM or SIGINT came: the reading stops and the summary says so. */
  stop: () => boolean;
  started: number;
}

/** SIGTERM and SIGINT stop a replay between messages rather than killing it. */
function stopOnSignals(): { requested: () => boolean; off: () => void } {
  let stop = false;
  const onSignal = () => {
    stop = true;
  };
  process.once('SIGTERM', onSignal);
  process.once('SIGINT', onSignal);
  return {
    requested: () => stop,
    off: () => {
      process.off('SIGTERM', onSignal);
      process.off('SIGINT', onSignal);
    },
  };
}

/** Runs the archive through the processor, writing the records in range and counting into the summary. */
async function replayArchive(
  { opts, inputs, bounds, processor, summary, writer, stop, started }: ReplayRun,
  io: CliIo,
): Promise<void> {
  const { config, range } = inputs;
  const emit = (records: readonly DerivedRecord[]) => emitInRange(records, range, summary, writer);
  const progress = progressReporter(summary, started, opts.quiet, io);
  const ordered: OrderedStats = { lateSamples: 0, lateSamplesUnmoved: 0 };
  const stream = readArchiveOrdered(
    opts.input,
    {
      topicPrefix: config.topic_prefix,
      latenessMs: config.processing.lateness_min * 60_000,
      shouldStop: stop,
      ...(bounds.stopAfterRxMs !== undefined ? { stopAfterRxMs: bounds.stopAfterRxMs } : {}),
    },
    ordered,
  );
  for await (const entry of stream) {
    if (stop()) {
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
      countReject(summary, input.reason);
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
    progress();
  }
  summary.lateSamplesMoved = ordered.lateSamples;
  // With --to, the windows before `to` are closed from the data read (the archive may go on).
  if ((opts.flushTail || range.toMs !== undefined) && !summary.interrupted) await emit(processor.drain());
}

function countReject(summary: ReplaySummary, reason: string): void {
  summary.rejected++;
  const short = reason.split(':')[0] ?? reason;
  summary.rejectsByReason[short] = (summary.rejectsByReason[short] ?? 0) + 1;
}

/** Writes the records whose time is in the range, counting them. */
async function emitInRange(
  records: readonly DerivedRecord[],
  range: Range,
  summary: ReplaySummary,
  writer: ChunkWriter,
): Promise<void> {
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
}

/** A progress line on stderr at most every 2 s, looked at every 1024 lines. */
function progressReporter(summary: ReplaySummary, started: number, quiet: boolean, io: CliIo): () => void {
  let lastProgress = started;
  return () => {
    if (quiet || (summary.lines & 1023) !== 0) return;
    const now = performance.now();
    if (now - lastProgress <= 2000) return;
    lastProgress = now;
    const rate = Math.round(summary.lines / ((now - started) / 1000));
    const msg2 = `replay: ${summary.lines} lines, ${summary.records} records, ${rate} lines/s`;
    io.stderr(io.isTty ? `\r${msg2}   ` : `${msg2}\n`);
  };
}

function endStream(stream: WriteStream): Promise<void> {
  return new Promise<void>((r) => stream.end(() => r()));
}

/** The summary as JSON (--summary-json) and as one line on stderr (unless --quiet). */
async function reportSummary(opts: ReplayOptions, summary: ReplaySummary, io: CliIo): Promise<void> {
  if (opts.summaryJson) {
    const { writeFile } = await import('node:fs/promises');
    await writeFile(opts.summaryJson, JSON.stringify(summary, null, 2) + '\n');
  }
  if (opts.quiet) return;
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
