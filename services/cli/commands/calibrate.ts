// `reefd calibrate --config FILE --input ARCHIVE --out CAL.yaml`: fits per-sensor corrections from the bottles
// in the archive (docs/methods/calibration.md 13.3-13.5) and writes a calibration_file. The archive is run
// through the processor once, so the optode's O2 in umol/kg and the CTD temperature are the ones the
// pipeline derives; each bottle is paired with the median of the sensor's readings within --match-min of
// its time. pCO2 sensors: offset and drift against pCO2 from the bottle's TA and DIC at the sensor's
// temperature; optodes: gain and gain drift against the bottle's o2_umol_kg. The fits are against the raw
// readings of the sensors fitted: the configured calibration_file's entries of pCO2 sensors and optodes are
// left out while collecting, those of other sensors (a CTD's, the barometer's) apply, and are carried over
// into the file written, as are the entries of sensors not refitted. Readings the logbook excludes are not
// paired with bottles.
import { writeFile } from 'node:fs/promises';
import path from 'node:path';
import { formatProblem, type ReefdConfig } from '../../../libs/contract/index.js';
import {
  compileCalibration,
  fitOptodeGain,
  fitPco2,
  formatCalibrationYaml,
  parseCalibrationText,
  type CalibrationEntry,
} from '../../../libs/calibration/index.js';
import { buildExclusionIndex } from '../../../libs/logbook/index.js';
import { loadFieldFiles, type FieldFiles } from '../../config/field-files.js';
import { loadConfigFile } from '../../config/load.js';
import { parseCommand } from '../args.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';
import { collect, jobs, type Collected, type Job } from './calibrate-pairs.js';
import { describeFit, iso } from './calibrate-report.js';

const HELP = `Usage: reefd calibrate --config FILE --input ARCHIVE --out CAL.yaml [options]

Fits corrections of the pCO2 sensors (offset and drift, against pCO2 computed from the
bottles' TA and DIC at the sensor's temperature) and of the oxygen optodes (gain and gain
drift, against the bottles' o2_umol_kg) from the sample messages in the archive, prints
each fit with its standard errors and every bottle's residual, and writes a
calibration_file. A fit with too few bottles, bottles bunched in time, or mostly
disagreeing bottles is refused with the reason (exit 2, nothing written).

Options:
  --config FILE     site configuration (required)
  --input PATH      raw archive file or folder, with the lab results in it (required)
  --out FILE        calibration file to write (required)
  --match-min N     pair a bottle with the sensor's readings within N minutes (default 10)
  --sensor S/X      fit only this sensor (repeatable)
  --drift           keep every fitted drift (by default a drift within 2 standard errors of
                    zero is dropped and the correction refitted as a constant)
  --no-drift        fit constant offsets and gains only (short deployments)
`;

const OPTIONS = {
  config: { type: 'string' },
  input: { type: 'string' },
  out: { type: 'string' },
  'match-min': { type: 'string' },
  sensor: { type: 'string', multiple: true },
  drift: { type: 'boolean', default: false },
  'no-drift': { type: 'boolean', default: false },
} as const;

interface CalibrateOptions {
  configPath: string;
  input: string;
  out: string;
  matchMin: number;
  /** --sensor: the sensors to fit (station/sensor), or none for all. */
  only: string[];
  drift: boolean;
  noDrift: boolean;
}

type Written = { entry: CalibrationEntry; comments: string[] };

export const run: CommandRun = async (args, io) => {
  const opts = parseOptions(args, io);
  if (typeof opts === 'number') return opts;
  const config = await loadConfig(opts.configPath, io);
  if (config === undefined) return EXIT_USAGE;
  for (const s of opts.only) {
    const [st = '', se = ''] = s.split('/');
    if (config.stations[st]?.sensors[se] === undefined) {
      io.stderr(`reefd calibrate: --sensor ${s} is not a sensor of the configuration (station/sensor)\n`);
      return EXIT_USAGE;
    }
  }
  let field: FieldFiles;
  try {
    field = await loadFieldFiles(path.dirname(path.resolve(opts.configPath)), config);
  } catch (err) {
    io.stderr(`reefd calibrate: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  const todo = await findJobs(opts, config, field, io);
  if (typeof todo === 'number') return todo;
  if (opts.drift && opts.noDrift) {
    io.stderr('reefd calibrate: give --drift or --no-drift, not both\n');
    return EXIT_USAGE;
  }
  const { entries, refused } = fitAll(opts, todo, io);
  return writeCalibration(opts, config, field, entries, { refused, fits: todo.length }, io);
};

/** The options, checked: the options as given, or the exit code after saying what is wrong. */
function parseOptions(args: string[], io: CliIo): CalibrateOptions | number {
  const parsed = parseCommand('calibrate', args, OPTIONS, HELP, io);
  if (!parsed.ok) return parsed.exit;
  const v = parsed.values;
  if (!v.config || !v.input || !v.out) {
    io.stderr(`reefd calibrate: --config, --input and --out are required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  const matchMin = v['match-min'] === undefined ? 10 : Number(v['match-min']);
  if (!(matchMin > 0 && matchMin <= 240)) {
    io.stderr(
      `reefd calibrate: --match-min must be a number of minutes from 0 to 240 (got ${v['match-min']})\n`,
    );
    return EXIT_USAGE;
  }
  return {
    configPath: v.config,
    input: v.input,
    out: v.out,
    matchMin,
    only: v.sensor ?? [],
    drift: v.drift ?? false,
    noDrift: v['no-drift'] ?? false,
  };
}

/**
 * Reads the archive and pairs the bottles with the sensors' readings, or the exit code after saying what is
 * wrong (no archive, nothing to fit). The configured corrections of the sensors fitted are left out, so the
 * fits are against their raw readings.
 */
async function findJobs(
  opts: CalibrateOptions,
  config: ReefdConfig,
  field: FieldFiles,
  io: CliIo,
): Promise<Job[] | number> {
  const fittable = fittableSensors(config, opts.only);
  let c: Collected;
  try {
    c = await collect(
      config,
      opts.input,
      {
        calibration: compileCalibration(field.calibration.filter((e) => !fittable.has(e.sensor))),
        logbook: field.logbook,
      },
      buildExclusionIndex(field.logbook),
    );
  } catch (err) {
    io.stderr(`reefd calibrate: ${(err as Error).message}\n`);
    return (err as { code?: string }).code === 'REEFD_INPUT_MISSING' ? EXIT_USAGE : EXIT_FAILURE;
  }
  const todo = jobs(config, c, opts.matchMin * 60_000, opts.only);
  if (todo.length === 0) {
    io.stderr(
      `reefd calibrate: nothing to fit: no pCO2 sensor has bottles with TA and DIC at its station, and no ` +
        `optode has bottles with o2_umol_kg (${c.bottles.length} sample message(s) in the archive; import lab ` +
        `results with reefd samples import)\n`,
    );
    return EXIT_USAGE;
  }
  return todo;
}

/** Runs each fit and prints it; the entries of the fits accepted, and how many were refused. */
function fitAll(
  opts: CalibrateOptions,
  todo: readonly Job[],
  io: CliIo,
): { entries: Written[]; refused: number } {
  const entries: Written[] = [];
  let refused = 0;
  const fitOpts = { drift: opts.noDrift ? false : opts.drift ? true : ('auto' as const) };
  for (const j of todo) {
    const r =
      j.kind === 'pco2' ? fitPco2(j.target, j.pairs, fitOpts) : fitOptodeGain(j.target, j.pairs, fitOpts);
    const text = describeFit(j, r, opts.matchMin);
    io.stdout(`${text.join('\n')}\n\n`);
    if (!r.ok) {
      refused++;
      continue;
    }
    entries.push({
      entry: r.entry,
      comments: [
        `${text[0]}`,
        `fitted from ${r.rows.length} bottles ${iso(r.rows[0]!.tMs)} to ${iso(r.rows[r.rows.length - 1]!.tMs)}`,
      ],
    });
  }
  return { entries, refused };
}

/**
 * Writes the calibration file: the new entries and those of the sensors not refitted, unless a fit was
 * refused. What is written must read back as a valid calibration file of this configuration.
 */
async function writeCalibration(
  opts: CalibrateOptions,
  config: ReefdConfig,
  field: FieldFiles,
  entries: Written[],
  { refused, fits }: { refused: number; fits: number },
  io: CliIo,
): Promise<number> {
  // Entries of sensors not refitted stay as they were (a CTD's, a sensor without bottles this time).
  const refit = new Set(entries.map((e) => e.entry.sensor));
  const carried = field.calibration.filter((e) => !refit.has(e.sensor));
  for (const e of carried)
    entries.push({ entry: e, comments: [`carried over from ${path.basename(field.calibrationFile ?? '')}`] });
  if (refused > 0) {
    io.stderr(
      `reefd calibrate: ${refused} of ${fits} fit(s) refused (see above); ${opts.out} not written. ` +
        `Fit the others alone with --sensor, or without drift with --no-drift.\n`,
    );
    return EXIT_USAGE;
  }
  const yaml = formatCalibrationYaml(entries, [
    `Calibration of ${config.site}, fitted by reefd calibrate from ${opts.input}`,
    `on ${iso(Date.now())}; bottles paired with sensor readings within ${opts.matchMin} min.`,
    'corrected = (slope + slope_drift_per_day x days) x raw + offset + drift_per_day x days, days since from.',
  ]);
  const check = parseCalibrationText(yaml, config);
  if (!check.ok) {
    io.stderr(
      `reefd calibrate: internal error: the written file does not validate: ${formatProblem(check.problems[0] as never)}\n`,
    );
    return EXIT_FAILURE;
  }
  await writeFile(opts.out, yaml);
  io.stderr(
    `calibrate: wrote ${entries.length} correction(s) to ${opts.out}` +
      `${carried.length > 0 ? ` (${carried.length} carried over unchanged)` : ''}; ` +
      `name it as calibration_file in the configuration\n`,
  );
  return EXIT_OK;
}

/** The pCO2 sensors and optodes a run may fit (all of them, or those given with --sensor). */
function fittableSensors(config: ReefdConfig, only: readonly string[]): Set<string> {
  const out = new Set<string>();
  for (const [station, st] of Object.entries(config.stations))
    for (const [id, sc] of Object.entries(st.sensors)) {
      const key = `${station}/${id}`;
      if ((sc.kind === 'pco2' || sc.kind === 'oxygen') && (only.length === 0 || only.includes(key)))
        out.add(key);
    }
  return out;
}

async function loadConfig(file: string, io: CliIo): Promise<ReefdConfig | undefined> {
  try {
    const r = await loadConfigFile(file);
    if (r.ok) return r.config;
    for (const p of r.problems) io.stderr(`${file}: ${formatProblem(p)}\n`);
  } catch (err) {
    io.stderr(`reefd calibrate: ${(err as Error).message}\n`);
  }
  return undefined;
}
