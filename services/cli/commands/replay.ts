// `reefd replay --config FILE --input ARCHIVE [--out FILE]`: the live pipeline's processor over a raw archive.
// Output: derived records as NDJSON (stdout by default). Deterministic: the same archive and configuration
// give byte-identical output.
import { createWriteStream, existsSync, type WriteStream } from 'node:fs';
import { createProcessor, messageFromArchiveLine } from '../../../libs/processor/index.js';
import { formatProblem, type DerivedRecord } from '../../../libs/contract/index.js';
import { readArchive } from '../../archive/index.js';
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

  let fileOut: WriteStream | undefined;
  let out: NodeJS.WritableStream = process.stdout;
  if (values.out) {
    fileOut = createWriteStream(values.out, { flags: 'w' });
    out = fileOut;
  }
  const writer = new ChunkWriter(out);
  const processor = createProcessor(config);
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
      summary.records++;
      summary.recordsByType[r.type] = (summary.recordsByType[r.type] ?? 0) + 1;
      await writer.line(JSON.stringify(r));
    }
  };

  try {
    for await (const entry of readArchive(values.input)) {
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
    if (values['flush-tail'] && !summary.interrupted) await emit(processor.drain());
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
        `(${by(summary.rejectsByReason)}), ${summary.duplicates} duplicates, ${summary.late} late; ` +
        `${summary.records} records (${by(summary.recordsByType)}) in ${summary.seconds.toFixed(1)} s\n`,
    );
  }
  return summary.interrupted ? EXIT_FAILURE : EXIT_OK;
};
