// The calibration file (docs/contract-v1.md, `calibration_file`; docs/methods/calibration.md 13.1): a YAML
// list of linear corrections of one message field of one sensor, optionally limited to a time range.
// Pure: parsing text and checking it against the configuration; reading the file is the caller's.
import { isNode, LineCounter, parseDocument } from 'yaml';
import {
  calibrationFileSchema,
  type CalibrationEntry,
  type Kind,
  type ReefdConfig,
} from '../contract/index.js';

/** Message fields a calibration may correct, per kind: the scalar readings (not ids, counters, settings). */
export const CALIBRATABLE_FIELDS = {
  ctd: ['temp_c', 'sal', 'pres_dbar', 'cond_mS_cm'],
  oxygen: ['o2_umol_l', 'o2_mg_l', 'o2_sat_pct', 'temp_c'],
  pco2: ['pco2_uatm', 'temp_c'],
  // p_dbar is corrected sample by sample (a logger's offset or gain).
  pressure: ['p_dbar', 'temp_c'],
  adcp: ['pres_dbar', 'temp_c', 'heading_deg'],
  par: ['par_umol_m2_s'],
  met: ['wind_m_s', 'baro_hpa', 'air_temp_c', 'xco2_air_ppm'],
  sample: [],
} as const satisfies Record<Kind, readonly string[]>;

export {
  calibrationEntrySchema,
  calibrationFileSchema,
  type CalibrationEntry,
  type CalibrationEntryInput,
} from '../contract/index.js';

export interface CalibrationProblem {
  /** Dotted path inside the file, e.g. `3.offset` (entry index from 0) or `(file)`. */
  path: string;
  message: string;
  line?: number;
}

export type CalibrationParse =
  | { ok: true; entries: CalibrationEntry[] }
  | { ok: false; code: 'REEFD_CALIBRATION_INVALID'; problems: CalibrationProblem[] };

/**
 * Parses calibration YAML (an empty file is an empty list) and validates it, with the config when given:
 * the sensor must exist, the field must be one of its kind's readings, and two entries of one sensor and
 * field must not overlap in time (which one applies would be ambiguous).
 */
export function parseCalibrationText(text: string, config?: ReefdConfig): CalibrationParse {
  const lc = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lc, uniqueKeys: true });
  if (doc.errors.length > 0) {
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_INVALID',
      problems: doc.errors.map((e) => {
        const p: CalibrationProblem = { path: '(file)', message: e.message.split('\n')[0] ?? e.message };
        const pos = e.linePos?.[0];
        if (pos) p.line = pos.line;
        return p;
      }),
    };
  }
  const raw: unknown = doc.toJS({ maxAliasCount: 50 }) ?? [];
  const lineOf = (path: readonly (string | number)[]): number | undefined => {
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return lc.linePos(node.range[0]).line;
    }
    return undefined;
  };
  const withLine = (p: CalibrationProblem, path: (string | number)[]): CalibrationProblem => {
    const line = lineOf(path);
    return line === undefined ? p : { ...p, line };
  };
  const r = calibrationFileSchema.safeParse(raw);
  if (!r.success) {
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_INVALID',
      problems: r.error.issues.map((i) => {
        const path = i.path.map((k) => (typeof k === 'number' ? k : String(k)));
        const msg =
          i.code === 'unrecognized_keys'
            ? `unknown key(s) ${i.keys.map((k) => `"${k}"`).join(', ')}`
            : i.message;
        return withLine({ path: path.join('.') || '(file)', message: msg }, path);
      }),
    };
  }
  const problems = config === undefined ? [] : checkCalibration(r.data, config);
  if (problems.length > 0)
    return {
      ok: false,
      code: 'REEFD_CALIBRATION_INVALID',
      problems: problems.map((p) =>
        withLine(
          p,
          p.path.split('.').map((k) => (/^\d+$/.test(k) ? Number(k) : k)),
        ),
      ),
    };
  return { ok: true, entries: r.data };
}

/** Problems of validated entries against a configuration (unknown sensors, fields, overlaps). */
export function checkCalibration(
  entries: readonly CalibrationEntry[],
  config: ReefdConfig,
): CalibrationProblem[] {
  const problems: CalibrationProblem[] = [];
  const seen = new Map<string, { i: number; from: number; to: number }[]>();
  entries.forEach((e, i) => {
    const [station = '', sensor = ''] = e.sensor.split('/');
    const sc = config.stations[station]?.sensors[sensor];
    if (config.stations[station] === undefined) {
      problems.push({ path: `${i}.sensor`, message: `station "${station}" is not in the configuration` });
      return;
    }
    if (sc === undefined) {
      problems.push({ path: `${i}.sensor`, message: `station "${station}" has no sensor "${sensor}"` });
      return;
    }
    const fields: readonly string[] = CALIBRATABLE_FIELDS[sc.kind];
    if (!fields.includes(e.field)) {
      problems.push({
        path: `${i}.field`,
        message:
          fields.length === 0
            ? `a ${sc.kind} sensor has no field to calibrate`
            : `"${e.field}" is not a reading of a ${sc.kind} sensor (one of ${fields.join(', ')})`,
      });
      return;
    }
    const key = `${e.sensor}|${e.field}`;
    const from = e.from === undefined ? Number.NEGATIVE_INFINITY : Date.parse(e.from);
    const to = e.to === undefined ? Number.POSITIVE_INFINITY : Date.parse(e.to);
    const list = seen.get(key) ?? [];
    const clash = list.find((o) => from < o.to && o.from < to);
    if (clash !== undefined) {
      problems.push({
        path: `${i}.from`,
        message: `overlaps entry ${clash.i} for ${e.sensor} ${e.field}: give them separate from/to ranges`,
      });
    }
    list.push({ i, from, to });
    seen.set(key, list);
  });
  return problems;
}

export function formatCalibrationProblem(p: CalibrationProblem): string {
  return `${p.path}: ${p.message}${p.line !== undefined ? ` (line ${p.line})` : ''}`;
}
