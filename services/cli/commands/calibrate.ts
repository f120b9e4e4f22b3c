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
import {
  formatProblem,
  type DerivedRecord,
  type ReefdConfig,
  type SensorMessage,
} from '../../../libs/contract/index.js';
import {
  compileCalibration,
  fitOptodeGain,
  fitPco2,
  formatCalibrationYaml,
  medianWithin,
  parseCalibrationText,
  pco2Reference,
  type CalibrationEntry,
  type FitResult,
  type FitTarget,
  type Pair,
} from '../../../libs/calibration/index.js';
import { buildExclusionIndex, exclusionAt, type ExclusionIndex } from '../../../libs/logbook/index.js';
import {
  createProcessor,
  messageFromArchiveLine,
  type ProcessorOptions,
} from '../../../libs/processor/index.js';
import { loadFieldFiles, type FieldFiles } from '../../config/field-files.js';
import { loadConfigFile } from '../../config/load.js';
import { readArchiveOrdered } from '../../replay/ordered.js';
import { parseCommand } from '../args.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

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

interface Series {
  t: number[];
  v: number[];
}
const push = (m: Map<string, Series>, key: string, t: number, v: number) => {
  let s = m.get(key);
  if (s === undefined) {
    s = { t: [], v: [] };
    m.set(key, s);
  }
  s.t.push(t);
  s.v.push(v);
};

interface Bottle {
  station: string;
  tMs: number;
  ta?: number;
  dic?: number;
  o2?: number;
  sal?: number;
}

interface Collected {
  pco2: Map<string, Series>;
  pco2Temp: Map<string, Series>;
  /** CTD temperature and salinity at each pCO2 reading, from the carbonate records. */
  ctdTemp: Map<string, Series>;
  ctdSal: Map<string, Series>;
  o2: Map<string, Series>;
  /** The O2 field each optode reports (the one the processor reads first). */
  o2Field: Map<string, string>;
  bottles: Bottle[];
}

function sortSeries(m: Map<string, Series>): void {
  for (const s of m.values()) {
    const idx = s.t.map((_, i) => i).sort((a, b) => (s.t[a] as number) - (s.t[b] as number));
    s.t = idx.map((i) => s.t[i] as number);
    s.v = idx.map((i) => s.v[i] as number);
  }
}

async function collect(
  config: ReefdConfig,
  input: string,
  options: ProcessorOptions,
  excluded: ExclusionIndex,
): Promise<Collected> {
  const c: Collected = {
    pco2: new Map(),
    pco2Temp: new Map(),
    ctdTemp: new Map(),
    ctdSal: new Map(),
    o2: new Map(),
    o2Field: new Map(),
    bottles: [],
  };
  const processor = createProcessor(config, undefined, options);
  const onRecords = (records: readonly DerivedRecord[]) => {
    for (const r of records) {
      if ((r as { flag?: unknown }).flag === 4) continue; // a failed or excluded reading pairs with no bottle
      const key = `${String(r.station ?? '')}/${String((r as { sensor?: unknown }).sensor ?? '')}`;
      const tMs = Date.parse(r.t);
      if (r.type === 'oxygen' && typeof r.o2_umol_kg === 'number') push(c.o2, key, tMs, r.o2_umol_kg);
      if (r.type === 'carbonate') {
        const x = r as { temp_c?: unknown; sal?: unknown };
        if (typeof x.temp_c === 'number') push(c.ctdTemp, key, tMs, x.temp_c);
        if (typeof x.sal === 'number') push(c.ctdSal, key, tMs, x.sal);
      }
    }
  };
  const stream = readArchiveOrdered(input, {
    topicPrefix: config.topic_prefix,
    latenessMs: config.processing.lateness_min * 60_000,
  });
  for await (const e of stream) {
    if (e.line === null) continue;
    const m = messageFromArchiveLine(config, e.line);
    if (!m.ok) continue;
    if (exclusionAt(excluded, m.message.station, m.message.sensor, m.message.tMs) === undefined)
      note(c, m.message);
    onRecords(processor.push(m.message, m.rxMs).records);
  }
  onRecords(processor.drain());
  for (const m of [c.pco2, c.pco2Temp, c.ctdTemp, c.ctdSal, c.o2]) sortSeries(m);
  return c;
}

function note(c: Collected, m: SensorMessage): void {
  const key = `${m.station}/${m.sensor}`;
  if (m.kind === 'pco2') {
    push(c.pco2, key, m.tMs, m.pco2_uatm);
    if (m.temp_c !== undefined) push(c.pco2Temp, key, m.tMs, m.temp_c);
  } else if (m.kind === 'oxygen' && !c.o2Field.has(key)) {
    c.o2Field.set(
      key,
      m.o2_umol_l !== undefined ? 'o2_umol_l' : m.o2_mg_l !== undefined ? 'o2_mg_l' : 'o2_sat_pct',
    );
  } else if (m.kind === 'sample') {
    const b: Bottle = { station: m.station, tMs: m.tMs };
    if (m.ta_umol_kg !== undefined) b.ta = m.ta_umol_kg;
    if (m.dic_umol_kg !== undefined) b.dic = m.dic_umol_kg;
    if (m.o2_umol_kg !== undefined) b.o2 = m.o2_umol_kg;
    if (m.sal !== undefined) b.sal = m.sal;
    c.bottles.push(b);
  }
}

interface Job {
  sensor: string;
  field: string;
  kind: 'pco2' | 'oxygen';
  target: FitTarget;
  pairs: Pair[];
  unpaired: number;
}

function jobs(config: ReefdConfig, c: Collected, windowMs: number, only: readonly string[]): Job[] {
  const out: Job[] = [];
  const opts = {
    carbonicConstants: config.carbonate.carbonic_constants,
    boron: config.carbonate.boron,
  } as const;
  for (const [station, st] of Object.entries(config.stations)) {
    for (const [id, sc] of Object.entries(st.sensors)) {
      const sensor = `${station}/${id}`;
      if (only.length > 0 && !only.includes(sensor)) continue;
      if (sc.kind !== 'pco2' && sc.kind !== 'oxygen') continue;
      const readings = sc.kind === 'pco2' ? c.pco2.get(sensor) : c.o2.get(sensor);
      if (readings === undefined || readings.t.length === 0) continue;
      const bottles = c.bottles.filter(
        (b) =>
          b.station === station &&
          (sc.kind === 'pco2' ? b.ta !== undefined && b.dic !== undefined : b.o2 !== undefined),
      );
      const pairs: Pair[] = [];
      let unpaired = 0;
      for (const b of bottles) {
        const raw = medianWithin(readings.t, readings.v, b.tMs, windowMs);
        if (raw === undefined) {
          unpaired++;
          continue;
        }
        if (sc.kind === 'oxygen') {
          pairs.push({ tMs: b.tMs, raw, reference: b.o2 as number });
          continue;
        }
        const own = c.pco2Temp.get(sensor);
        const ctdT = c.ctdTemp.get(sensor);
        const temp =
          (own ? medianWithin(own.t, own.v, b.tMs, windowMs) : undefined) ??
          (ctdT ? medianWithin(ctdT.t, ctdT.v, b.tMs, windowMs) : undefined);
        const ctdS = c.ctdSal.get(sensor);
        const sal = b.sal ?? (ctdS ? medianWithin(ctdS.t, ctdS.v, b.tMs, windowMs) : undefined);
        const ref =
          temp !== undefined && sal !== undefined
            ? pco2Reference(
                { taUmolKg: b.ta as number, dicUmolKg: b.dic as number, salinity: sal },
                temp,
                opts,
              )
            : undefined;
        if (ref === undefined) unpaired++;
        else pairs.push({ tMs: b.tMs, raw, reference: ref });
      }
      if (bottles.length === 0) continue;
      out.push({
        sensor,
        field: sc.kind === 'pco2' ? 'pco2_uatm' : (c.o2Field.get(sensor) ?? 'o2_umol_l'),
        kind: sc.kind,
        target: {
          sensor,
          field: '',
          fromMs: readings.t[0] as number,
          toMs: readings.t[readings.t.length - 1] as number,
        },
        pairs,
        unpaired,
      });
    }
  }
  for (const j of out) j.target.field = j.field;
  return out;
}

const f = (x: number, dp: number) => (Number.isFinite(x) ? x.toFixed(dp) : String(x));
const iso = (ms: number) => new Date(ms).toISOString().replace('.000Z', 'Z');

function describeFit(j: Job, r: FitResult, windowMin: number): string[] {
  const unit = j.kind === 'pco2' ? 'uatm' : 'umol/kg';
  const lines: string[] = [];
  const head =
    `${j.sensor} ${j.field}: ${r.rows.length} bottle(s) within ${windowMin} min` +
    (j.unpaired > 0 ? ` (${j.unpaired} more without a reading or a carbonate solution)` : '');
  if (r.ok) {
    const ps = r.params
      .map((p) => {
        const u =
          p.name === 'offset'
            ? ` ${unit}`
            : p.name === 'drift_per_day'
              ? ` ${unit}/d`
              : p.name === 'slope_drift_per_day'
                ? ' /d'
                : '';
        return `${p.name} ${p.value.toPrecision(6)} +- ${p.se.toPrecision(2)}${u}`;
      })
      .join(', ');
    const dropped = r.driftDropped
      ? `; drift ${r.driftDropped.value.toPrecision(2)} +- ${r.driftDropped.se.toPrecision(2)}${j.kind === 'pco2' ? ` ${unit}` : ''}/d ` +
        `is within 2 SE of zero: fitted constant`
      : '';
    lines.push(`${head}: ${ps}; scatter ${f(r.scale, 2)} ${unit}, ${r.outliers} outlier(s)${dropped}`);
  } else lines.push(`${head}: REFUSED (${r.code}): ${r.reason}`);
  if (r.rows.length > 0) {
    lines.push(
      `  ${'bottle time'.padEnd(21)} ${'days'.padStart(6)} ${'reference'.padStart(10)} ${'raw'.padStart(9)} ${'corrected'.padStart(10)} ${'residual'.padStart(9)} weight`,
    );
    for (const row of r.rows) {
      lines.push(
        `  ${iso(row.tMs).padEnd(21)} ${f(row.days, 2).padStart(6)} ${f(row.reference, 2).padStart(10)} ${f(row.raw, 2).padStart(9)} ` +
          `${f(row.corrected, 2).padStart(10)} ${f(row.residual, 2).padStart(9)} ${f(row.weight, 2).padStart(6)}${row.weight === 0 ? '  outlier' : ''}`,
      );
    }
  }
  return lines;
}

export const run: CommandRun = async (args, io) => {
  const parsed = parseCommand(
    'calibrate',
    args,
    {
      config: { type: 'string' },
      input: { type: 'string' },
      out: { type: 'string' },
      'match-min': { type: 'string' },
      sensor: { type: 'string', multiple: true },
      drift: { type: 'boolean', default: false },
      'no-drift': { type: 'boolean', default: false },
    },
    HELP,
    io,
  );
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
  const config = await loadConfig(v.config, io);
  if (config === undefined) return EXIT_USAGE;
  const only = v.sensor ?? [];
  for (const s of only) {
    const [st = '', se = ''] = s.split('/');
    if (config.stations[st]?.sensors[se] === undefined) {
      io.stderr(`reefd calibrate: --sensor ${s} is not a sensor of the configuration (station/sensor)\n`);
      return EXIT_USAGE;
    }
  }
  let field: FieldFiles;
  try {
    field = await loadFieldFiles(path.dirname(path.resolve(v.config)), config);
  } catch (err) {
    io.stderr(`reefd calibrate: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  const fittable = fittableSensors(config, only);
  let c: Collected;
  try {
    c = await collect(
      config,
      v.input,
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
  const todo = jobs(config, c, matchMin * 60_000, only);
  if (todo.length === 0) {
    io.stderr(
      `reefd calibrate: nothing to fit: no pCO2 sensor has bottles with TA and DIC at its station, and no ` +
        `optode has bottles with o2_umol_kg (${c.bottles.length} sample message(s) in the archive; import lab ` +
        `results with reefd samples import)\n`,
    );
    return EXIT_USAGE;
  }
  const entries: { entry: CalibrationEntry; comments: string[] }[] = [];
  let refused = 0;
  if (v.drift && v['no-drift']) {
    io.stderr('reefd calibrate: give --drift or --no-drift, not both\n');
    return EXIT_USAGE;
  }
  const fitOpts = { drift: v['no-drift'] ? false : v.drift ? true : ('auto' as const) };
  for (const j of todo) {
    const r =
      j.kind === 'pco2' ? fitPco2(j.target, j.pairs, fitOpts) : fitOptodeGain(j.target, j.pairs, fitOpts);
    const text = describeFit(j, r, matchMin);
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
  // Entries of sensors not refitted stay as they were (a CTD's, a sensor without bottles this time).
  const refit = new Set(entries.map((e) => e.entry.sensor));
  const carried = field.calibration.filter((e) => !refit.has(e.sensor));
  for (const e of carried)
    entries.push({ entry: e, comments: [`carried over from ${path.basename(field.calibrationFile ?? '')}`] });
  if (refused > 0) {
    io.stderr(
      `reefd calibrate: ${refused} of ${todo.length} fit(s) refused (see above); ${v.out} not written. ` +
        `Fit the others alone with --sensor, or without drift with --no-drift.\n`,
    );
    return EXIT_USAGE;
  }
  const yaml = formatCalibrationYaml(entries, [
    `Calibration of ${config.site}, fitted by reefd calibrate from ${v.input}`,
    `on ${iso(Date.now())}; bottles paired with sensor readings within ${matchMin} min.`,
    'corrected = (slope + slope_drift_per_day x days) x raw + offset + drift_per_day x days, days since from.',
  ]);
  // What we write must read back as a valid calibration file of this configuration.
  const check = parseCalibrationText(yaml, config);
  if (!check.ok) {
    io.stderr(
      `reefd calibrate: internal error: the written file does not validate: ${formatProblem(check.problems[0] as never)}\n`,
    );
    return EXIT_FAILURE;
  }
  await writeFile(v.out, yaml);
  io.stderr(
    `calibrate: wrote ${entries.length} correction(s) to ${v.out}` +
      `${carried.length > 0 ? ` (${carried.length} carried over unchanged)` : ''}; ` +
      `name it as calibration_file in the configuration\n`,
  );
  return EXIT_OK;
};

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
