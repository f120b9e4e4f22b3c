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

export const run: CommandRun = async (args, io) => {
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
  let config: ReefdConfig | undefined;
  if (v.config) {
    try {
      const c = await loadConfigFile(v.config);
      if (!c.ok) {
        for (const p of c.problems) io.stderr(`${v.config}: ${formatProblem(p)}\n`);
        return EXIT_USAGE;
      }
      config = c.config;
    } catch (err) {
      io.stderr(`reefd export: ${(err as Error).message}\n`);
      return EXIT_USAGE;
    }
  }
  const meta = v.meta ? await readMeta(v.meta, io) : {};
  if (meta === undefined) return EXIT_USAGE;
  try {
    const scan = await scanRecords(v.records);
    if (scan.invalid > 0) {
      io.stderr(
        `reefd export: ${scan.invalid} line(s) of ${v.records} are not derived records and were skipped ` +
          `(lines ${scan.invalidLines.join(', ')}${scan.invalid > scan.invalidLines.length ? ', ...' : ''})\n`,
      );
    }
    if (scan.records === 0) {
      io.stderr(`reefd export: ${v.records} holds no derived records; nothing to export\n`);
      return EXIT_USAGE;
    }
    await mkdir(v.out, { recursive: true });
    const epoch = io.env.SOURCE_DATE_EPOCH;
    const createdMs = epoch !== undefined && /^\d+$/.test(epoch) ? Number(epoch) * 1000 : Date.now();
    let files: string[];
    if (v.format === 'csv') files = (await exportCsv(v.records, scan, v.out)).files;
    else {
      const nc = await exportNetcdf(v.records, scan, v.out, {
        config,
        createdIso: new Date(createdMs).toISOString().replace(/\.\d{3}Z$/, 'Z'),
        software: `reefd ${version()}`,
        meta,
        sourceName: v.records.split(/[\\/]/).pop() ?? v.records,
      });
      files = nc.files;
      if (nc.withoutPosition.length > 0) {
        io.stderr(
          `reefd export: no position for ${nc.withoutPosition.join(', ')}: lat and lon are left out, so CF ` +
            `checkers see points, not time series; give --config with stations.<id>.position\n`,
        );
      }
    }
    if (!v.quiet) {
      io.stderr(
        `export: ${scan.records} records (${scan.superseded} earlier revisions or copies left out) -> ` +
          `${files.length} ${v.format === 'csv' ? 'CSV' : 'NetCDF'} file(s) in ${v.out}\n`,
      );
    }
    for (const f of files) io.stdout(`${f}\n`);
    return EXIT_OK;
  } catch (err) {
    io.stderr(`reefd export: ${(err as Error).message}\n`);
    return EXIT_FAILURE;
  }
};
