// `reefd logbook add|list`: the field log of the deployment (docs/contract-v1.md, `logbook_file`). `add` is
// for the technician back from the water: it checks the entry against the configuration, and appends it to
// the configured file under a lock with an atomic rewrite (temp file, fsync, rename), so a crash or a second
// technician at the same time never leaves half a file; comments and earlier entries are kept as written.
import { open, readFile, rename, rm, stat } from 'node:fs/promises';
import path from 'node:path';
import { formatProblem, type ReefdConfig } from '../../../libs/contract/index.js';
import {
  checkLogbook,
  formatLogbookEntry,
  LOGBOOK_EVENTS,
  logbookEntrySchema,
  parseLogbookText,
  type LogbookEntry,
} from '../../../libs/logbook/index.js';
import { loadConfigFile } from '../../config/load.js';
import { parseCommand, type Parsed } from '../args.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd logbook add --config FILE --station S [--sensor X] --event EVENT [--text TEXT]
                         [--exclude-from ISO --exclude-to ISO] [--t ISO]
       reefd logbook list --config FILE [--station S]

Keeps the field log named by logbook_file in the configuration (a YAML list beside it).
Data of the station (or only of the sensor) between --exclude-from and --exclude-to is
flagged 4 (fail) with reason logbook_exclusion when the deployment is processed.

Options:
  --config FILE       site configuration with logbook_file (required)
  --station S         station the event concerns (required for add)
  --sensor X          only this sensor of the station
  --event EVENT       ${LOGBOOK_EVENTS.join(' | ')}
  --text TEXT         what was done, for the people reading the plots later
  --exclude-from ISO  start of the data to exclude (ISO 8601 with zone, e.g. 2026-07-15T09:20:00Z)
  --exclude-to ISO    end of the exclusion (not included)
  --t ISO             when it happened (default: now)
`;

/** Replaces `file` with `text` atomically, keeping the old file's mode (or 0644 for a new file). */
export async function replaceFile(file: string, text: string): Promise<void> {
  const mode = await stat(file).then(
    (s) => s.mode & 0o777,
    () => 0o644,
  );
  const tmp = `${file}.tmp-${process.pid}`;
  const fh = await open(tmp, 'w', mode);
  try {
    await fh.writeFile(text);
    await fh.sync();
  } finally {
    await fh.close();
  }
  await rename(tmp, file);
  const dir = await open(path.dirname(file), 'r');
  try {
    await dir.sync();
  } finally {
    await dir.close();
  }
}

/** A lock file beside `file` (O_EXCL); one older than staleMs is taken to be left by a crash and replaced. */
export async function withLock<T>(file: string, fn: () => Promise<T>, staleMs = 60_000): Promise<T> {
  const lock = `${file}.lock`;
  for (let attempt = 0; ; attempt++) {
    try {
      const fh = await open(lock, 'wx');
      await fh.writeFile(`${process.pid}\n`);
      await fh.close();
      break;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST' || attempt > 0) throw err;
      const age = Date.now() - (await stat(lock)).mtimeMs;
      if (age < staleMs) {
        throw new Error(
          `${lock} is held by another logbook writer (${Math.round(age / 1000)} s old); try again`,
        );
      }
      await rm(lock, { force: true });
    }
  }
  try {
    return await fn();
  } finally {
    await rm(lock, { force: true });
  }
}

async function loadConfig(
  file: string | undefined,
  io: CliIo,
): Promise<{ config: ReefdConfig; logbook: string } | number> {
  if (!file) {
    io.stderr(`reefd logbook: --config is required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  let r;
  try {
    r = await loadConfigFile(file);
  } catch (err) {
    io.stderr(`reefd logbook: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  if (!r.ok) {
    for (const p of r.problems) io.stderr(`${file}: ${formatProblem(p)}\n`);
    return EXIT_USAGE;
  }
  if (r.config.logbook_file === undefined) {
    io.stderr(
      `reefd logbook: ${file} has no logbook_file; add a line such as "logbook_file: logbook.yaml" ` +
        `(a path beside the configuration) and run again\n`,
    );
    return EXIT_USAGE;
  }
  return { config: r.config, logbook: path.resolve(path.dirname(file), r.config.logbook_file) };
}

async function readText(file: string): Promise<string> {
  try {
    return await readFile(file, 'utf8');
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return '';
    throw err;
  }
}

const OPTIONS = {
  config: { type: 'string' },
  station: { type: 'string' },
  sensor: { type: 'string' },
  event: { type: 'string' },
  text: { type: 'string' },
  'exclude-from': { type: 'string' },
  'exclude-to': { type: 'string' },
  t: { type: 'string' },
} as const;

type Values = Extract<Parsed<typeof OPTIONS>, { ok: true }>['values'];

export const run: CommandRun = async (args, io) => {
  const [sub, ...rest] = args;
  if (sub === '--help' || sub === '-h') {
    io.stdout(HELP);
    return EXIT_OK;
  }
  if (sub !== 'add' && sub !== 'list') {
    io.stderr(`reefd logbook: expected "add" or "list"\n\n${HELP}`);
    return EXIT_USAGE;
  }
  const parsed = parseCommand(`logbook ${sub}`, rest, OPTIONS, HELP, io);
  if (!parsed.ok) return parsed.exit;
  const v = parsed.values;
  const loaded = await loadConfig(v.config, io);
  if (typeof loaded === 'number') return loaded;
  const { config, logbook } = loaded;
  if (sub === 'list') return list(logbook, config, v.station, io);
  const entry = checkEntry(v, config, io);
  if (typeof entry === 'number') return entry;
  try {
    return await withLock(logbook, () => appendEntry(logbook, entry, config, io));
  } catch (err) {
    io.stderr(`reefd logbook add: ${(err as Error).message}\n`);
    return EXIT_FAILURE;
  }
};

/** The entry `add` describes, checked against the schema and the configuration, or the exit code. */
function checkEntry(v: Values, config: ReefdConfig, io: CliIo): LogbookEntry | number {
  if (!v.station || !v.event) {
    io.stderr(`reefd logbook add: --station and --event are required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  const raw: Record<string, unknown> = {
    t: v.t ?? new Date(Math.floor(Date.now() / 1000) * 1000).toISOString().replace('.000Z', 'Z'),
    station: v.station,
    event: v.event,
  };
  if (v.text !== undefined) raw.text = v.text;
  if (v.sensor !== undefined) raw.sensor = v.sensor;
  if (v['exclude-from'] !== undefined) raw.exclude_from = v['exclude-from'];
  if (v['exclude-to'] !== undefined) raw.exclude_to = v['exclude-to'];
  const checked = logbookEntrySchema.safeParse(raw);
  const flag = (k: string) => `--${k.replace('_', '-')}`;
  if (!checked.success) {
    for (const i of checked.error.issues)
      io.stderr(`reefd logbook add: ${flag(String(i.path[0] ?? 'entry'))} ${i.message}\n`);
    return EXIT_USAGE;
  }
  const entry: LogbookEntry = checked.data;
  const bad = checkLogbook([entry], config);
  if (bad.length > 0) {
    for (const p of bad) io.stderr(`reefd logbook add: --${String(p.path[1])} ${p.message}\n`);
    return EXIT_USAGE;
  }
  return entry;
}

/**
 * Appends the entry to the logbook (called under its lock): the file must read cleanly before, and read back
 * with one more entry after, or nothing is written.
 */
async function appendEntry(
  logbook: string,
  entry: LogbookEntry,
  config: ReefdConfig,
  io: CliIo,
): Promise<number> {
  const text = await readText(logbook);
  const now = parseLogbookText(text, config);
  if (!now.ok) {
    for (const p of now.problems)
      io.stderr(`${logbook}: ${p.path}: ${p.message}${p.line !== undefined ? ` (line ${p.line})` : ''}\n`);
    io.stderr(`reefd logbook add: ${logbook} has problems; fix them first (nothing was added)\n`);
    return EXIT_USAGE;
  }
  // An empty list may be written as `[]`: keep its comments and start a block list.
  const head =
    now.entries.length === 0
      ? text
          .split('\n')
          .filter((l) => l.trimStart().startsWith('#'))
          .join('\n')
      : text;
  const next = `${head}${head === '' || head.endsWith('\n') ? '' : '\n'}${formatLogbookEntry(entry)}`;
  const again = parseLogbookText(next, config);
  if (!again.ok || again.entries.length !== now.entries.length + 1) {
    io.stderr(
      `reefd logbook add: the entry could not be appended to ${logbook} as valid YAML; nothing was added\n`,
    );
    return EXIT_FAILURE;
  }
  await replaceFile(logbook, next);
  const what = entry.sensor !== undefined ? `${entry.station}/${entry.sensor}` : entry.station;
  const excl =
    entry.exclude_from !== undefined ? `, excluding ${entry.exclude_from} to ${entry.exclude_to}` : '';
  io.stdout(
    `${logbook}: added ${entry.event} at ${what} ${entry.t}${excl} (${again.entries.length} entries)\n`,
  );
  return EXIT_OK;
}

async function list(
  file: string,
  config: ReefdConfig,
  station: string | undefined,
  io: CliIo,
): Promise<number> {
  const r = parseLogbookText(await readText(file), config);
  if (!r.ok) {
    for (const p of r.problems)
      io.stderr(`${file}: ${p.path}: ${p.message}${p.line !== undefined ? ` (line ${p.line})` : ''}\n`);
    return EXIT_USAGE;
  }
  for (const e of r.entries) {
    if (station !== undefined && e.station !== station) continue;
    const where = e.sensor !== undefined ? `${e.station}/${e.sensor}` : e.station;
    const excl = e.exclude_from !== undefined ? `  [excluded ${e.exclude_from} .. ${e.exclude_to}]` : '';
    io.stdout(`${e.t}  ${e.event.padEnd(8)} ${where}  ${e.text ?? ''}${excl}\n`);
  }
  return EXIT_OK;
}
