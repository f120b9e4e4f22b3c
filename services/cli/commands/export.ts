// `reefd export --records FILE --format csv|netcdf --out DIR`: derived records (NDJSON from `reefd replay` or
// outputs.ndjson) to files for Python, R, MATLAB and data centres: CSV, one file per record type; or NetCDF
// (CF-1.8, ACDD-1.3), one file per station or transect. The latest revision of each record wins.
import { existsSync } from 'node:fs';
import { mkdir, readFile } from 'node:fs/promises';
import { parse as parseYaml } from 'yaml';
import { formatProblem, type ReefdConfig } from '../../../libs/contract/index.js';
import { NC_NAME } from '../../../libs/netcdf/index.js';
import { loadConfigFile } from '../../config/load.js';
import { exportCsv } from '../../export/csv.js';
import { exportNetcdf } from '../../export/netcdf.js';
import { scanRecords } from '../../export/scan.js';
import { version } from '../main.js';
import { parseCommand } from '../args.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd export --records FILE --format csv|netcdf --out DIR [options]

Writes derived records (NDJSON, plain or .gz) as CSV, one file per record type plus
columns.csv (units, descriptions, CF standard names), or as NetCDF following the CF-1.8
conventions (featureType timeSeries) with ACDD-1.3 attributes, one file per station or
transect. When a record appears more than once, its latest revision is exported once.

Options:
  --records FILE   derived records, NDJSON (required)
  --format F       csv or netcdf (required)
  --out DIR        output folder, created if needed (required)
  --config FILE    site configuration: station positions and labels for the NetCDF metadata
  --meta FILE      YAML map of extra global attributes (ACDD: creator_name, creator_email,
                   institution, project, license, ...); they override the defaults
  --quiet          no summary on stderr

The NetCDF date_created is the current time, or SOURCE_DATE_EPOCH (seconds) when set,
for files that are identical from run to run.
`;

async function readMeta(file: string, io: CliIo): Promise<Record<string, string | number> | undefined> {
  let raw: unknown;
  try {
    raw = parseYaml(await readFile(file, 'utf8'));
  } catch (err) {
    io.stderr(`reefd export: --meta ${file}: ${(err as Error).message}\n`);
    return undefined;
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    io.stderr(`reefd export: --meta ${file} must be a YAML map of attribute: value\n`);
    return undefined;
  }
  const out: Record<string, string | number> = {};
  for (const [k, v] of Object.entries(raw)) {
    if (!NC_NAME.test(k) || (typeof v !== 'string' && typeof v !== 'number')) {
      io.stderr(
        `reefd export: --meta ${file}: "${k}" must be an attribute name with a text or number value\n`,
      );
      return undefined;
    }
    out[k] = v;
  }
  return out;
}

interface ExportOptions {
  records: string;
  format: 'csv' | 'netcdf';
  out: string;
  configPath?: string;
  metaPath?: string;
  quiet: boolean;
}

type Meta = Record<string, string | number>;
type Scan = Awaited<ReturnType<typeof scanRecords>>;

export const run: CommandRun = async (args, io) => {
  const opts = parseOptions(args, io);
  if (typeof opts === 'number') return opts;
  const config = opts.configPath ? await loadConfig(opts.configPath, io) : undefined;
  if (config === EXIT_USAGE) return EXIT_USAGE;
  const meta = opts.metaPath ? await readMeta(opts.metaPath, io) : {};
  if (meta === undefined) return EXIT_USAGE;
  try {
    const scan = await scanRecords(opts.records);
    if (scan.invalid > 0) {
      io.stderr(
        `reefd export: ${scan.invalid} line(s) of ${opts.records} are not derived records and were skipped ` +
          `(lines ${scan.invalidLines.join(', ')}${scan.invalid > scan.invalidLines.length ? ', ...' : ''})\n`,
      );
    }
    if (scan.records === 0) {
      io.stderr(`reefd export: ${opts.records} holds no derived records; nothing to export\n`);
      return EXIT_USAGE;
    }
    await mkdir(opts.out, { recursive: true });
    const files = await writeFiles(opts, scan, config, meta, io);
    if (!opts.quiet) {
      io.stderr(
        `export: ${scan.records} records (${scan.superseded} earlier revisions or copies left out) -> ` +
          `${files.length} ${opts.format === 'csv' ? 'CSV' : 'NetCDF'} file(s) in ${opts.out}\n`,
      );
    }
    for (const f of files) io.stdout(`${f}\n`);
    return EXIT_OK;
  } catch (err) {
    io.stderr(`reefd export: ${(err as Error).message}\n`);
    return EXIT_FAILURE;
  }
};

/** The options, checked, or the exit code after the help or saying what is wrong. */
function parseOptions(args: string[], io: CliIo): ExportOptions | number {
  const parsed = parseCommand(
    'export',
    args,
    {
      records: { type: 'string' },
      format: { type: 'string' },
      out: { type: 'string' },
      config: { type: 'string' },
      meta: { type: 'string' },
      quiet: { type: 'boolean', default: false },
    },
    HELP,
    io,
  );
  if (!parsed.ok) return parsed.exit;
  const v = parsed.values;
  if (!v.records || !v.format || !v.out) {
    io.stderr(`reefd export: --records, --format and --out are required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  if (v.format !== 'csv' && v.format !== 'netcdf') {
    io.stderr(`reefd export: --format must be csv or netcdf (got "${v.format}")\n`);
    return EXIT_USAGE;
  }
  if (!existsSync(v.records)) {
    io.stderr(`reefd export: records file ${v.records} does not exist\n`);
    return EXIT_USAGE;
  }
  return {
    records: v.records,
    format: v.format,
    out: v.out,
    ...(v.config ? { configPath: v.config } : {}),
    ...(v.meta ? { metaPath: v.meta } : {}),
    quiet: v.quiet ?? false,
  };
}

/** The configuration given with --config, or EXIT_USAGE after saying why it cannot be used. */
async function loadConfig(file: string, io: CliIo): Promise<ReefdConfig | typeof EXIT_USAGE> {
  try {
    const c = await loadConfigFile(file);
    if (!c.ok) {
      for (const p of c.problems) io.stderr(`${file}: ${formatProblem(p)}\n`);
      return EXIT_USAGE;
    }
    return c.config;
  } catch (err) {
    io.stderr(`reefd export: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
}

/**
 * Writes the CSV or NetCDF files and returns their paths. The NetCDF files' creation time is
 * SOURCE_DATE_EPOCH when set, so that a build of the same records is byte-identical.
 */
async function writeFiles(
  opts: ExportOptions,
  scan: Scan,
  config: ReefdConfig | undefined,
  meta: Meta,
  io: CliIo,
): Promise<string[]> {
  const epoch = io.env.SOURCE_DATE_EPOCH;
  const createdMs = epoch !== undefined && /^\d+$/.test(epoch) ? Number(epoch) * 1000 : Date.now();
  if (opts.format === 'csv') return (await exportCsv(opts.records, scan, opts.out)).files;
  const nc = await exportNetcdf(opts.records, scan, opts.out, {
    config,
    createdIso: new Date(createdMs).toISOString().replace(/\.\d{3}Z$/, 'Z'),
    software: `reefd ${version()}`,
    meta,
    sourceName: opts.records.split(/[\\/]/).pop() ?? opts.records,
  });
  if (nc.withoutPosition.length > 0) {
    io.stderr(
      `reefd export: no position for ${nc.withoutPosition.join(', ')}: lat and lon are left out, so CF ` +
        `checkers see points, not time series; give --config with stations.<id>.position\n`,
    );
  }
  return nc.files;
}
