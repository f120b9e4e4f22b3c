// `reefd samples import --config FILE --csv LAB.csv --archive DIR`: lab results (TA, DIC, pH, reference O2)
// into the raw archive as `sample` messages received now (docs/contract-v1.md, E5). Every row is checked
// first (libs/samples); one bad row and nothing is imported. The accepted rows go to the archive through its
// writer in one write and one fsync, which the writer cuts back whole if it fails (services/archive).
import { existsSync } from 'node:fs';
import { readFile, stat } from 'node:fs/promises';
import { formatProblem, parseTopic, type ReefdConfig } from '../../../libs/contract/index.js';
import { checkSheet, parseCsv, type ArchiveFacts } from '../../../libs/samples/index.js';
import { archiveLine, createArchiveWriter, readArchive } from '../../archive/index.js';
import { loadConfigFile } from '../../config/load.js';
import { parseCommand } from '../args.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd samples import --config FILE --csv LAB.csv --archive DIR

Adds lab results to the raw archive as sample messages received now, so that replay uses
them at their sampling time. Columns: t, station, sensor, then any of ta_umol_kg,
dic_umol_kg, ph_total, o2_umol_kg, sal, temp_c (one row per bottle; t in ISO 8601 with
its zone; the sensor is a sample sensor of the configuration).

Every row is checked (stations and sensors, plausible values and units, duplicates in the
sheet and in the archive, times within the deployment in the archive); problems are
printed as "LAB.csv row N: ..." (row 1 is the header, as in a spreadsheet) and nothing
is imported unless every row is good.

While the daemon is running, publish lab results to its broker instead (the daemon
archives them itself); this command is for the archive of a finished deployment.

Options:
  --config FILE    site configuration (required)
  --csv FILE       the lab sheet (required)
  --archive DIR    the raw archive folder (required)
  --dry-run        check only; write nothing
`;

/** Event-time span of the archive's accepted messages and the samples it holds. */
export async function archiveFacts(dir: string, config: ReefdConfig): Promise<ArchiveFacts | undefined> {
  let firstMs = Number.POSITIVE_INFINITY;
  let lastMs = Number.NEGATIVE_INFINITY;
  const samples = new Map<string, string>();
  for await (const e of readArchive(dir)) {
    const line = e.line;
    if (line === null || line.reject !== undefined) continue;
    const t = (line.msg as { t?: unknown } | null)?.t;
    const tMs = typeof t === 'string' ? Date.parse(t) : Number.NaN;
    if (!Number.isFinite(tMs)) continue;
    const tp = parseTopic(line.topic, config.topic_prefix);
    if (!tp.ok || tp.parts.site !== config.site) continue;
    if (tp.parts.kind === 'sample') samples.set(`${tp.parts.station}/${tp.parts.sensor}/${tMs}`, line.rx);
    else {
      if (tMs < firstMs) firstMs = tMs;
      if (tMs > lastMs) lastMs = tMs;
    }
  }
  return Number.isFinite(firstMs) ? { firstMs, lastMs, samples } : undefined;
}

async function load(file: string, io: CliIo): Promise<ReefdConfig | undefined> {
  try {
    const r = await loadConfigFile(file);
    if (r.ok) return r.config;
    for (const p of r.problems) io.stderr(`${file}: ${formatProblem(p)}\n`);
  } catch (err) {
    io.stderr(`reefd samples import: ${(err as Error).message}\n`);
  }
  return undefined;
}

interface ImportOptions {
  configPath: string;
  csv: string;
  archive: string;
  dryRun: boolean;
}

type Accepted = ReturnType<typeof checkSheet>['accepted'];

export const run: CommandRun = async (args, io) => {
  const opts = await parseOptions(args, io);
  if (typeof opts === 'number') return opts;
  const config = await load(opts.configPath, io);
  if (config === undefined) return EXIT_USAGE;
  const accepted = await checkLabSheet(opts, config, io);
  if (typeof accepted === 'number') return accepted;
  if (opts.dryRun) {
    io.stdout(`${opts.csv}: all ${accepted.length} rows are good; nothing written (--dry-run)\n`);
    return EXIT_OK;
  }
  return appendSamples(opts, accepted, io);
};

/** The subcommand and its options, checked, or the exit code after the help or saying what is wrong. */
async function parseOptions(args: string[], io: CliIo): Promise<ImportOptions | number> {
  const [sub, ...rest] = args;
  if (sub === '--help' || sub === '-h') {
    io.stdout(HELP);
    return EXIT_OK;
  }
  if (sub !== 'import') {
    io.stderr(`reefd samples: expected "import"\n\n${HELP}`);
    return EXIT_USAGE;
  }
  const parsed = parseCommand(
    'samples import',
    rest,
    {
      config: { type: 'string' },
      csv: { type: 'string' },
      archive: { type: 'string' },
      'dry-run': { type: 'boolean', default: false },
    },
    HELP,
    io,
  );
  if (!parsed.ok) return parsed.exit;
  const v = parsed.values;
  if (!v.config || !v.csv || !v.archive) {
    io.stderr(`reefd samples import: --config, --csv and --archive are required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  for (const [flag, p] of [
    ['--csv', v.csv],
    ['--archive', v.archive],
  ] as const) {
    if (!existsSync(p)) {
      io.stderr(`reefd samples import: ${flag} ${p} does not exist\n`);
      return EXIT_USAGE;
    }
  }
  if (!(await stat(v.archive)).isDirectory()) {
    io.stderr(`reefd samples import: --archive ${v.archive} is not a folder (give the archive folder)\n`);
    return EXIT_USAGE;
  }
  return { configPath: v.config, csv: v.csv, archive: v.archive, dryRun: v['dry-run'] ?? false };
}

/** Every row of the sheet checked against the configuration and the archive: the rows, or the exit code. */
async function checkLabSheet(
  opts: ImportOptions,
  config: ReefdConfig,
  io: CliIo,
): Promise<Accepted | number> {
  const sheet = parseCsv(await readFile(opts.csv, 'utf8'));
  if (!sheet.ok) {
    io.stderr(`${opts.csv} row ${sheet.row}: ${sheet.reason}; nothing was imported\n`);
    return EXIT_USAGE;
  }
  const facts = await archiveFacts(opts.archive, config);
  if (facts === undefined) {
    io.stderr(
      `reefd samples import: the archive ${opts.archive} holds no accepted messages of site ${config.site}, ` +
        `so the sample times cannot be checked against the deployment; nothing was imported\n`,
    );
    return EXIT_USAGE;
  }
  const r = checkSheet(config, sheet.header, sheet.rows, facts);
  if (r.sheet.length > 0) {
    for (const p of r.sheet) io.stderr(`${opts.csv} row 1: ${p}\n`);
    io.stderr(`reefd samples import: the columns are not usable; nothing was imported\n`);
    return EXIT_USAGE;
  }
  if (r.rejected.length > 0) {
    for (const x of r.rejected) for (const why of x.reasons) io.stderr(`${opts.csv} row ${x.row}: ${why}\n`);
    io.stderr(
      `reefd samples import: ${r.rejected.length} of ${sheet.rows.length} rows rejected; nothing was imported. ` +
        `Fix them and run again.\n`,
    );
    return EXIT_USAGE;
  }
  return r.accepted;
}

/** Appends the rows to the archive as messages received now, in one batch the writer commits whole. */
async function appendSamples(opts: ImportOptions, accepted: Accepted, io: CliIo): Promise<number> {
  const rxMs = Date.now();
  const rx = new Date(rxMs).toISOString();
  const writer = await createArchiveWriter({
    dir: opts.archive,
    fsyncMs: 50,
    retentionDays: 0,
    clock: Date.now,
  });
  try {
    // Appended in one turn of the event loop: the writer commits them as one batch (one write, one fsync).
    await Promise.all(
      accepted.map((a) => writer.append(archiveLine(a.topic, rx, JSON.stringify(a.msg)), rxMs)),
    );
  } catch (err) {
    io.stderr(
      `reefd samples import: writing the archive failed (${(err as Error).message}); nothing was imported\n`,
    );
    await writer.close().catch(() => undefined);
    return EXIT_FAILURE;
  }
  await writer.close();
  io.stdout(
    `${opts.csv}: imported ${accepted.length} lab results into ${opts.archive} (received ${rx}); ` +
      `replay uses them at their sampling time\n`,
  );
  return EXIT_OK;
}
