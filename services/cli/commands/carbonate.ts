// `reefd carbonate --sal S --temp T [--pres P] <two of --ta --dic --ph --pco2> [--json]` (contract section 5):
// solves the carbonate system once with libs/carbonate and prints the contract `carbonate` fields, with
// first-order uncertainties (docs/methods/uncertainty.md 9.1) beside them.
//
// ta_source keeps the contract's list (salinity | sample | measured): "salinity" with --ta-s35 (TA =
// ta_s35 S/35, the contract's alkalinity.source salinity), else "measured": given with --ta, or following
// from the two measured parameters given; the extension field ta_calculated (true) tells the latter apart.

import { parseArgs } from 'node:util';
import type {
  CarbonateInput,
  CarbonateOptions,
  CarbonateSigmas,
  CarbonateSolution,
  UncertainOutput,
} from '../../../libs/carbonate/index.js';
import { CARBONATE_OPTION_NAMES, carbonateUncertainty } from '../../../libs/carbonate/index.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd carbonate --sal S --temp T [--pres P] <two of --ta --dic --ph --pco2 --fco2> [--json]

Solves the seawater carbonate system once and prints TA, DIC, pH (total scale), pCO2, CO3, Omega
aragonite and calcite, HCO3, CO2*, the Revelle factor, and one standard uncertainty for each.

Conditions
  --sal S            practical salinity
  --temp T           temperature of the measurement, degC
  --pres P           sea pressure of the measurement, dbar (default 0)
  --out-temp T       report at this temperature instead (TA and DIC held), degC
  --out-pres P       report at this sea pressure, dbar
  --baro HPA         barometric pressure for pCO2 <-> fCO2, hPa (default 1013.25)
Inputs (exactly two kinds; concentrations in umol/kg, pCO2/fCO2 in uatm, wet, at --temp)
  --ta X | --ta-s35 X (TA = X S/35)   --dic X   --ph X (total scale)   --pco2 X | --fco2 X
  --po4 X, --si X    phosphate and silicate, umol/kg (default 0)
Constants (defaults first)
  --carbonic-constants ${CARBONATE_OPTION_NAMES.carbonicConstants.join('|')}   (K1, K2 of carbonic acid)
  --boron ${CARBONATE_OPTION_NAMES.boron.join('|')}
  --kw ${CARBONATE_OPTION_NAMES.kw.join('|')}
  --fugacity ${CARBONATE_OPTION_NAMES.fugacity.join('|')}
Uncertainties (standard uncertainty of each input; constants after Orr et al. 2018)
  --u-ta 5  --u-dic 2  --u-ph 0.01  --u-pco2 max(2, 1 % of reading)  --u-temp 0.05  --u-sal 0.05
  --no-sigma         skip the uncertainty propagation
Output
  --json             one JSON object with the contract carbonate fields (ta_umol_kg, dic_umol_kg, ph_total,
                     pco2_uatm, co3_umol_kg, omega_ar, omega_ca, ta_source) plus extension fields
                     (fco2_uatm, hco3_umol_kg, co2_umol_kg, revelle, ph_free, ph_sws, flag, <field>_sigma, notes)

Exit 0 on a solution, 1 when the inputs have no physical solution, 2 on bad usage.
`;

const NUMERIC = [
  'sal',
  'temp',
  'pres',
  'out-temp',
  'out-pres',
  'baro',
  'ta',
  'ta-s35',
  'dic',
  'ph',
  'pco2',
  'fco2',
  'po4',
  'si',
  'u-ta',
  'u-dic',
  'u-ph',
  'u-pco2',
  'u-temp',
  'u-sal',
] as const;
type NumericOption = (typeof NUMERIC)[number];

class UsageError extends Error {}

function usage(io: CliIo, message: string): number {
  io.stderr(`reefd carbonate: ${message}\nRun 'reefd carbonate --help' for usage.\n`);
  return EXIT_USAGE;
}

function parseNumber(name: string, raw: string): number {
  const v = raw.trim() === '' ? NaN : Number(raw);
  if (!Number.isFinite(v)) throw new UsageError(`--${name} must be a number, got "${raw}"`);
  return v;
}

function pick<T extends string>(name: string, raw: string | undefined, valid: readonly T[]): T | undefined {
  if (raw === undefined) return undefined;
  if (!(valid as readonly string[]).includes(raw)) {
    throw new UsageError(`--${name} must be one of ${valid.join(', ')}, got "${raw}"`);
  }
  return raw as T;
}

/** Contract names of the outputs (snake_case wire names, contract section 4 `carbonate` plus extensions). */
const WIRE: Record<UncertainOutput, string> = {
  taUmolKg: 'ta_umol_kg',
  dicUmolKg: 'dic_umol_kg',
  phTotal: 'ph_total',
  pco2Uatm: 'pco2_uatm',
  fco2Uatm: 'fco2_uatm',
  co3UmolKg: 'co3_umol_kg',
  hco3UmolKg: 'hco3_umol_kg',
  co2UmolKg: 'co2_umol_kg',
  omegaAr: 'omega_ar',
  omegaCa: 'omega_ca',
  revelle: 'revelle',
};

const TABLE: { key: UncertainOutput; label: string; unit: string; digits: number }[] = [
  { key: 'taUmolKg', label: 'TA', unit: 'umol/kg', digits: 2 },
  { key: 'dicUmolKg', label: 'DIC', unit: 'umol/kg', digits: 2 },
  { key: 'phTotal', label: 'pH (total)', unit: '', digits: 4 },
  { key: 'pco2Uatm', label: 'pCO2', unit: 'uatm', digits: 2 },
  { key: 'fco2Uatm', label: 'fCO2', unit: 'uatm', digits: 2 },
  { key: 'co3UmolKg', label: 'CO3--', unit: 'umol/kg', digits: 2 },
  { key: 'hco3UmolKg', label: 'HCO3-', unit: 'umol/kg', digits: 2 },
  { key: 'co2UmolKg', label: 'CO2*', unit: 'umol/kg', digits: 3 },
  { key: 'omegaAr', label: 'Omega aragonite', unit: '', digits: 3 },
  { key: 'omegaCa', label: 'Omega calcite', unit: '', digits: 3 },
  { key: 'revelle', label: 'Revelle factor', unit: '', digits: 3 },
];

type Values = Record<string, string | boolean | undefined>;
type Numbers = Partial<Record<NumericOption, number>>;

/** One checked request: what to solve, with which constants and uncertainties, and how to print it. */
interface CarbonateRequest {
  num: Numbers & { sal: number; temp: number };
  input: CarbonateInput;
  options: CarbonateOptions;
  sigmas: CarbonateSigmas;
  noSigma: boolean;
  json: boolean;
  taSource: 'measured' | 'salinity';
  /** TA follows from the two measured parameters (no --ta or --ta-s35 given). */
  taCalculated: boolean;
}

export const run: CommandRun = async (args, io) => {
  const values = parseValues(args, io);
  if (typeof values === 'number') return values;
  let request: CarbonateRequest;
  try {
    request = checkRequest(values);
  } catch (e) {
    if (e instanceof UsageError) return usage(io, e.message);
    throw e;
  }
  const result = carbonateUncertainty(request.input, request.sigmas, request.options);
  if (!result.ok) {
    io.stderr(`reefd carbonate: ${result.code}: ${result.reason}\n`);
    return result.code === 'REEFD_CARBONATE_BAD_INPUT' || result.code === 'REEFD_CARBONATE_BAD_PAIR'
      ? EXIT_USAGE
      : EXIT_FAILURE;
  }
  io.stdout(request.json ? formatJson(request, result) : formatTable(request, result));
  return EXIT_OK;
};

/** The options as given, or the exit code after the help or a usage message. */
function parseValues(args: string[], io: CliIo): Values | number {
  let parsed;
  try {
    parsed = parseArgs({
      args,
      strict: true,
      allowPositionals: false,
      options: {
        ...Object.fromEntries(NUMERIC.map((k) => [k, { type: 'string' as const }])),
        'carbonic-constants': { type: 'string' },
        k1k2: { type: 'string' },
        boron: { type: 'string' },
        kw: { type: 'string' },
        fugacity: { type: 'string' },
        json: { type: 'boolean' },
        'no-sigma': { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    return usage(io, (e as Error).message);
  }
  const values = parsed.values as Values;
  if (values.help === true) {
    io.stdout(HELP);
    return EXIT_OK;
  }
  return values;
}

/** The request the options describe; throws a UsageError saying what is wrong with them. */
function checkRequest(values: Values): CarbonateRequest {
  const num: Numbers = {};
  for (const k of NUMERIC) {
    const raw = values[k];
    if (typeof raw === 'string') num[k] = parseNumber(k, raw);
  }
  const options = constantOptions(values);
  const checked = checkInputKinds(num);
  const noSigma = values['no-sigma'] === true;
  return {
    num: checked,
    ...solverInput(checked),
    options,
    sigmas: noSigma ? { constants: 'none' } : inputSigmas(checked),
    noSigma,
    json: values.json === true,
  };
}

/** --carbonic-constants, --boron, --kw and --fugacity, checked against the names libs/carbonate knows. */
function constantOptions(values: Values): CarbonateOptions {
  const options: CarbonateOptions = {};
  if (values.k1k2 !== undefined) throw new UsageError('--k1k2 is now --carbonic-constants (same values)');
  const carbonicConstants = pick(
    'carbonic-constants',
    values['carbonic-constants'] as string | undefined,
    CARBONATE_OPTION_NAMES.carbonicConstants,
  );
  const boron = pick('boron', values.boron as string | undefined, CARBONATE_OPTION_NAMES.boron);
  const kw = pick('kw', values.kw as string | undefined, CARBONATE_OPTION_NAMES.kw);
  const fugacity = pick('fugacity', values.fugacity as string | undefined, CARBONATE_OPTION_NAMES.fugacity);
  if (carbonicConstants) options.carbonicConstants = carbonicConstants;
  if (boron) options.boron = boron;
  if (kw) options.kw = kw;
  if (fugacity) options.fugacity = fugacity;
  return options;
}

/** Salinity and temperature are given, and exactly two kinds of input, each given once. */
function checkInputKinds(num: Numbers): Numbers & { sal: number; temp: number } {
  if (num.sal === undefined || num.temp === undefined) throw new UsageError('--sal and --temp are required');
  if (num.ta !== undefined && num['ta-s35'] !== undefined)
    throw new UsageError('give --ta or --ta-s35, not both');
  if (num.pco2 !== undefined && num.fco2 !== undefined)
    throw new UsageError('give --pco2 or --fco2, not both');
  const kinds = [
    num.ta !== undefined || num['ta-s35'] !== undefined ? '--ta' : undefined,
    num.dic !== undefined ? '--dic' : undefined,
    num.ph !== undefined ? '--ph' : undefined,
    num.pco2 !== undefined || num.fco2 !== undefined ? '--pco2' : undefined,
  ].filter((k) => k !== undefined);
  if (kinds.length !== 2) {
    throw new UsageError(
      `give exactly two of --ta (or --ta-s35), --dic, --ph, --pco2 (or --fco2); got ${kinds.length === 0 ? 'none' : kinds.join(', ')}`,
    );
  }
  return { ...num, sal: num.sal, temp: num.temp };
}

function solverInput(
  num: Numbers & { sal: number; temp: number },
): Pick<CarbonateRequest, 'input' | 'taSource' | 'taCalculated'> {
  const input: CarbonateInput = { salinity: num.sal, tempC: num.temp };
  if (num.pres !== undefined) input.seaPressureDbar = num.pres;
  if (num['out-temp'] !== undefined) input.outTempC = num['out-temp'];
  if (num['out-pres'] !== undefined) input.outSeaPressureDbar = num['out-pres'];
  if (num.baro !== undefined) input.baroHpa = num.baro;
  if (num.po4 !== undefined) input.po4UmolKg = num.po4;
  if (num.si !== undefined) input.sio4UmolKg = num.si;
  let taSource: 'measured' | 'salinity' = 'measured';
  const taCalculated = num.ta === undefined && num['ta-s35'] === undefined;
  if (num.ta !== undefined) {
    input.taUmolKg = num.ta;
    taSource = 'measured';
  } else if (num['ta-s35'] !== undefined) {
    input.taUmolKg = (num['ta-s35'] * num.sal) / 35;
    taSource = 'salinity';
  }
  if (num.dic !== undefined) input.dicUmolKg = num.dic;
  if (num.ph !== undefined) input.phTotal = num.ph;
  if (num.pco2 !== undefined) input.pco2Uatm = num.pco2;
  if (num.fco2 !== undefined) input.fco2Uatm = num.fco2;
  return { input, taSource, taCalculated };
}

/** The standard uncertainty of each input: the --u-* options, else the defaults the help lists. */
function inputSigmas(num: Numbers): CarbonateSigmas {
  return {
    taUmolKg: num['u-ta'] ?? 5,
    dicUmolKg: num['u-dic'] ?? 2,
    phTotal: num['u-ph'] ?? 0.01,
    pco2Uatm: num['u-pco2'] ?? Math.max(2, 0.01 * (num.pco2 ?? 0)),
    fco2Uatm: num['u-pco2'] ?? Math.max(2, 0.01 * (num.fco2 ?? 0)),
    tempC: num['u-temp'] ?? 0.05,
    salinity: num['u-sal'] ?? 0.05,
  };
}

type Solved = Extract<ReturnType<typeof carbonateUncertainty>, { ok: true }>;

/** --json: the contract carbonate fields, then the extensions, the sigmas and the notes, on one line. */
function formatJson({ taSource, taCalculated, noSigma }: CarbonateRequest, result: Solved): string {
  const value: CarbonateSolution = result.value;
  const obj: Record<string, unknown> = {
    ta_umol_kg: value.taUmolKg,
    dic_umol_kg: value.dicUmolKg,
    ph_total: value.phTotal,
    pco2_uatm: value.pco2Uatm,
    co3_umol_kg: value.co3UmolKg,
    omega_ar: value.omegaAr,
    omega_ca: value.omegaCa,
    ta_source: taSource,
    ...(taCalculated ? { ta_calculated: true } : {}),
    fco2_uatm: value.fco2Uatm,
    hco3_umol_kg: value.hco3UmolKg,
    co2_umol_kg: value.co2UmolKg,
    revelle: value.revelle,
    ph_free: value.phFree,
    ph_sws: value.phSws,
    flag: value.flag,
  };
  if (!noSigma) for (const row of TABLE) obj[`${WIRE[row.key]}_sigma`] = result.sigma[row.key];
  obj.notes = value.notes;
  return `${JSON.stringify(obj)}\n`;
}

/** The table for people: one line per output with its uncertainty, then the solver's notes. */
function formatTable({ num, input, taSource, noSigma }: CarbonateRequest, result: Solved): string {
  const value: CarbonateSolution = result.value;
  const lines: string[] = [];
  const at = `S ${num.sal}, t ${input.outTempC ?? num.temp} degC, ${input.outSeaPressureDbar ?? num.pres ?? 0} dbar`;
  lines.push(`Carbonate system at ${at} (flag ${value.flag}; TA ${taSource})`);
  const w = Math.max(...TABLE.map((r) => r.label.length));
  for (const row of TABLE) {
    const v = value[row.key].toFixed(row.digits);
    const sg = noSigma ? '' : ` +- ${result.sigma[row.key].toFixed(row.digits)}`;
    lines.push(`  ${row.label.padEnd(w)}  ${v.padStart(10)}${sg.padEnd(16)} ${row.unit}`.trimEnd());
  }
  for (const note of value.notes) lines.push(`  note: ${note}`);
  return `${lines.join('\n')}\n`;
}
