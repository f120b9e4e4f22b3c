// Checking a lab result sheet before it enters the raw archive (docs/contract-v1.md, `samples import`;
// docs/methods/calibration.md 13.7). Every row is checked and every problem reported with its row number:
// unknown station or sensor, a sensor that is not a sample sensor, values in the wrong unit (caught by the
// ranges seawater can have), duplicates within the sheet and against the archive, times outside the
// deployment. The caller imports all rows or none.
import { formatTopic, validatePayload, type ReefdConfig } from '../contract/index.js';
import type { CsvRow } from './csv.js';

/** The columns of E5: the place and time, then any of the sample's values. */
export const ID_COLUMNS = ['t', 'station', 'sensor'] as const;
export const VALUE_COLUMNS = [
  'ta_umol_kg',
  'dic_umol_kg',
  'ph_total',
  'o2_umol_kg',
  'sal',
  'temp_c',
] as const;
type ValueColumn = (typeof VALUE_COLUMNS)[number];

interface Plausible {
  min: number;
  max: number;
  unit: string;
  /** A value in another common unit, recognised by its range, and what to do about it. */
  misread?: { min: number; max: number; say: string }[];
}

/**
 * Ranges of reef and open-ocean surface water, wide enough for lagoons and upwelling (common practice;
 * TA and DIC of seawater are ~1,800-2,500 umol/kg, O2 0-~400 umol/kg, pH(T) ~7.5-8.4).
 */
export const PLAUSIBLE: Readonly<Record<ValueColumn, Plausible>> = {
  ta_umol_kg: {
    min: 1000,
    max: 3500,
    unit: 'umol/kg',
    misread: [{ min: 1, max: 3.5, say: 'looks like mmol/kg; give umol/kg (x 1000)' }],
  },
  dic_umol_kg: {
    min: 1000,
    max: 3500,
    unit: 'umol/kg',
    misread: [{ min: 1, max: 3.5, say: 'looks like mmol/kg; give umol/kg (x 1000)' }],
  },
  o2_umol_kg: {
    min: 15,
    max: 500,
    unit: 'umol/kg',
    misread: [
      {
        min: 0.5,
        max: 15,
        say: 'looks like mg/L (x 31.25 / density) or mL/L (x 44.66 / density); give umol/kg',
      },
      { min: 500, max: 16000, say: 'looks like ug/L or nmol/kg; give umol/kg' },
    ],
  },
  ph_total: { min: 7.0, max: 8.8, unit: 'on the total scale' },
  sal: {
    min: 20,
    max: 42,
    unit: '(practical salinity)',
    misread: [
      { min: 0.02, max: 0.042, say: 'looks like a mass fraction; give practical salinity (e.g. 35.1)' },
    ],
  },
  temp_c: {
    min: -2,
    max: 40,
    unit: 'degC',
    misread: [{ min: 271, max: 313, say: 'looks like kelvin; give degC (K - 273.15)' }],
  },
};

export interface ArchiveFacts {
  /** Earliest and latest event time of the accepted messages in the archive, ms. */
  firstMs: number;
  lastMs: number;
  /** Samples already in the archive: `station/sensor/tMs` -> receive time (ISO). */
  samples: ReadonlyMap<string, string>;
}

/** How far outside the archive's span a bottle may be (taken just before the first logger message). */
export const SPAN_MARGIN_MS = 3_600_000;

export interface AcceptedRow {
  row: number;
  topic: string;
  /** The `sample` payload (contract message format). */
  msg: Record<string, unknown>;
}

export interface SheetCheck {
  /** Problems with the sheet as a whole (columns). */
  sheet: string[];
  accepted: AcceptedRow[];
  rejected: { row: number; reasons: string[] }[];
}

const ISO_ZONED = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/;

function checkHeader(header: readonly string[]): string[] {
  const problems: string[] = [];
  const known = new Set<string>([...ID_COLUMNS, ...VALUE_COLUMNS]);
  for (const c of ID_COLUMNS) if (!header.includes(c)) problems.push(`the column "${c}" is missing`);
  header.forEach((c, i) => {
    if (!known.has(c))
      problems.push(`column ${i + 1} "${c}" is not one of ${[...ID_COLUMNS, ...VALUE_COLUMNS].join(', ')}`);
    else if (header.indexOf(c) !== i) problems.push(`the column "${c}" appears twice`);
  });
  if (!header.some((c) => (VALUE_COLUMNS as readonly string[]).includes(c)))
    problems.push(`no value column (${VALUE_COLUMNS.join(', ')})`);
  return problems;
}

function checkValue(col: ValueColumn, text: string, out: string[]): number | undefined {
  const s = text.trim();
  if (s === '') return undefined;
  if (/^-?\d+,\d+$/.test(s)) {
    out.push(`${col} "${s}" is not a number; use a point as the decimal mark`);
    return undefined;
  }
  const v = Number(s);
  if (!Number.isFinite(v)) {
    out.push(`${col} "${s}" is not a number`);
    return undefined;
  }
  const p = PLAUSIBLE[col];
  if (v >= p.min && v <= p.max) return v;
  const m = p.misread?.find((r) => v >= r.min && v <= r.max);
  out.push(
    m !== undefined
      ? `${col} ${s} ${m.say}`
      : `${col} ${s} is outside ${p.min}-${p.max} ${p.unit}, which seawater can have; check the value and its unit`,
  );
  return undefined;
}

function sampleSensors(config: ReefdConfig): string {
  const list = Object.entries(config.stations).flatMap(([st, s]) =>
    Object.entries(s.sensors)
      .filter(([, c]) => c.kind === 'sample')
      .map(([id]) => `${st}/${id}`),
  );
  return list.length > 0 ? list.join(', ') : 'none configured';
}

/** Checks every row; accepted rows carry the archive topic and message to append. */
export function checkSheet(
  config: ReefdConfig,
  header: readonly string[],
  rows: readonly CsvRow[],
  facts: ArchiveFacts,
): SheetCheck {
  const sheet = checkHeader(header);
  if (sheet.length > 0) return { sheet, accepted: [], rejected: [] };
  if (rows.length === 0) return { sheet: ['the sheet has a header but no rows'], accepted: [], rejected: [] };
  const col = (cells: readonly string[], name: string) => (cells[header.indexOf(name)] ?? '').trim();
  const accepted: AcceptedRow[] = [];
  const rejected: { row: number; reasons: string[] }[] = [];
  const seen = new Map<string, number>();
  const iso = (ms: number) => new Date(ms).toISOString();
  for (const { row, cells } of rows) {
    const reasons: string[] = [];
    if (cells.length !== header.length)
      reasons.push(`has ${cells.length} cells for ${header.length} columns`);
    const t = col(cells, 't');
    const station = col(cells, 'station');
    const sensor = col(cells, 'sensor');
    let tMs: number | undefined;
    if (!ISO_ZONED.test(t) || !Number.isFinite(Date.parse(t))) {
      reasons.push(
        t === ''
          ? 't is empty'
          : /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2})?$/.test(t)
            ? `t "${t}" has no time zone; write it as ${t.replace(' ', 'T')}Z for UTC, or with its offset (+10:00)`
            : `t "${t}" is not an ISO 8601 time (e.g. 2026-07-14T08:30:00Z)`,
      );
    } else tMs = Date.parse(t);
    const st = config.stations[station];
    const sc = st?.sensors[sensor];
    if (st === undefined)
      reasons.push(`unknown station "${station}" (sample sensors: ${sampleSensors(config)})`);
    else if (sc === undefined)
      reasons.push(
        `station "${station}" has no sensor "${sensor}" (sample sensors: ${sampleSensors(config)})`,
      );
    else if (sc.kind !== 'sample')
      reasons.push(
        `${station}/${sensor} is ${/^[aeiou]/.test(sc.kind) ? 'an' : 'a'} ${sc.kind} sensor, not a sample sensor (sample sensors: ${sampleSensors(config)})`,
      );
    const msg: Record<string, unknown> = { v: 1, t };
    let values = 0;
    for (const c of VALUE_COLUMNS) {
      if (!header.includes(c)) continue;
      const v = checkValue(c, col(cells, c), reasons);
      if (v !== undefined) {
        msg[c] = v;
        if (c !== 'sal' && c !== 'temp_c') values++;
      }
    }
    if (values === 0 && !reasons.some((r) => VALUE_COLUMNS.some((c) => r.startsWith(c))))
      reasons.push('has none of ta_umol_kg, dic_umol_kg, ph_total, o2_umol_kg');
    if (tMs !== undefined) {
      if (tMs < facts.firstMs - SPAN_MARGIN_MS || tMs > facts.lastMs + SPAN_MARGIN_MS)
        reasons.push(
          `t ${t} is outside the deployment in the archive (${iso(facts.firstMs)} to ${iso(facts.lastMs)})`,
        );
      const key = `${station}/${sensor}/${tMs}`;
      const first = seen.get(key);
      if (first !== undefined) reasons.push(`repeats row ${first} (same station, sensor and time)`);
      else seen.set(key, row);
      const rx = facts.samples.get(key);
      if (rx !== undefined) reasons.push(`is already in the archive (received ${rx})`);
    }
    if (reasons.length === 0) {
      // The same validation the daemon applies to a received message: nothing we add could be refused later.
      const parts = { site: config.site, station, kind: 'sample', sensor };
      const v = validatePayload(parts, msg);
      if (!v.ok) reasons.push(`is not a valid sample message (${v.reason})`);
      else accepted.push({ row, topic: formatTopic(config.topic_prefix, parts), msg });
    }
    if (reasons.length > 0) rejected.push({ row, reasons });
  }
  return { sheet: [], accepted, rejected };
}
