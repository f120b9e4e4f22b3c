// Helpers of test/unit/contract-doc.test.ts: markdown tables, the parts of zod 4 schemas it reads, and the
// units the contract's names carry as suffixes, and minimal valid messages.
import { validatePayload } from '../../libs/contract/index.js';

// ---------------------------------------------------------------------------------------- markdown tables

export interface Table {
  /** Text of the nearest heading above the table, without the #s. */
  heading: string;
  header: string[];
  rows: string[][];
}

export function parseTables(md: string): Table[] {
  const out: Table[] = [];
  const lines = md.split('\n');
  let heading = '';
  const cells = (l: string) =>
    l
      .trim()
      .replace(/^\|/, '')
      .replace(/\|$/, '')
      .split('|')
      .map((c) => c.trim());
  for (let i = 0; i < lines.length; i++) {
    const l = lines[i] as string;
    if (l.startsWith('#')) heading = l.replace(/^#+\s*/, '');
    if (!l.startsWith('|') || !(lines[i + 1] ?? '').startsWith('|---')) continue;
    const t: Table = { heading, header: cells(l), rows: [] };
    for (i += 2; i < lines.length && (lines[i] as string).startsWith('|'); i++)
      t.rows.push(cells(lines[i] as string));
    out.push(t);
  }
  return out;
}

/** A cell's text without the backticks of inline code. */
export const plain = (cell: string): string => cell.replace(/`/g, '').trim();

// ---------------------------------------------------------------------------------------- zod introspection

/** The parts of a zod 4 schema this test reads. */
export interface Zod {
  def: {
    type: string;
    innerType?: Zod;
    valueType?: Zod;
    values?: unknown[];
    format?: string;
    options?: Zod[];
  };
  shape?: Record<string, Zod>;
  options?: readonly Zod[] | readonly string[];
  isOptional(): boolean;
  safeParse(x: unknown): { success: boolean; data?: unknown };
}
export const zod = (s: unknown): Zod => s as Zod;
const WRAPPERS = new Set(['optional', 'default', 'prefault', 'nullable', 'readonly', 'catch']);

export function unwrap(s: Zod): Zod {
  let x = s;
  while (WRAPPERS.has(x.def.type) && x.def.innerType) x = x.def.innerType;
  return x;
}

/** The schema at a dotted path: `<name>` steps into a record's values, other parts into object keys. */
export function at(root: Zod, path: string): Zod | undefined {
  let s: Zod | undefined = root;
  for (const part of path.split('.')) {
    if (s === undefined) return undefined;
    const u: Zod = unwrap(s);
    s = part.startsWith('<') ? u.def.valueType : u.shape?.[part];
  }
  return s;
}

/** Does a documented type (`number`, `integer`, `string`, `boolean`, `array ...`, `map`, `any`) fit? */
export function typeFits(doc: string, s: Zod): boolean {
  const u = unwrap(s);
  const t = u.def.type;
  const lit = (k: string) => t === 'literal' && (u.def.values ?? []).every((v) => typeof v === k);
  if (doc === 'number') return t === 'number' || lit('number');
  if (doc === 'integer') return t === 'number' && (u.def.format ?? '').includes('int');
  if (doc === 'string') return t === 'string' || t === 'enum' || lit('string');
  if (doc === 'boolean') return t === 'boolean';
  if (doc.startsWith('array')) return t === 'array';
  if (doc === 'map') return t === 'record';
  if (doc === 'any') return t === 'unknown' || t === 'any';
  throw new Error(`unknown documented type "${doc}"`);
}

export function enumValues(s: Zod): string[] | undefined {
  const u = unwrap(s);
  if (u.def.type === 'enum') return (u.options as readonly string[]).slice();
  if (u.def.type === 'literal') return (u.def.values ?? []).map(String);
  return undefined;
}

/** The value a key takes when absent: parsing `undefined` through its schema. */
export const defaultOf = (s: Zod): unknown => {
  const r = s.safeParse(undefined);
  return r.success ? r.data : Symbol.for('required');
};

// ---------------------------------------------------------------------------------------- units

/** Unit suffixes of the contract's names, longest first; `_sigma` takes its field's unit. */
const SUFFIX_UNITS: [string, string][] = (
  [
    ['_umol_m2_s', 'umol m-2 s-1'],
    ['_mmol_m2_h', 'mmol m-2 h-1'],
    ['_mmol_m2_d', 'mmol m-2 d-1'],
    ['_umol_kg', 'umol/kg'],
    ['_umol_l', 'umol/L'],
    ['_mS_cm', 'mS/cm'],
    ['_mg_l', 'mg/L'],
    ['_per_m', 'm-1'],
    ['_uatm', 'uatm'],
    ['_dbar', 'dbar'],
    ['_pct', '%'],
    ['_ppm', 'ppm'],
    ['_hpa', 'hPa'],
    ['_deg', 'deg'],
    ['_min', 'min'],
    ['_m_s', 'm/s'],
    ['_hz', 'Hz'],
    ['_c', 'degC'],
    ['_m', 'm'],
    ['_s', 's'],
    ['_h', 'h'],
    ['_v', 'V'],
  ] as [string, string][]
).sort((a, b) => b[0].length - a[0].length);
/** Names that end like a unit but are not one. */
const NOT_A_SUFFIX: Record<string, string> = { t_min: 'ISO 8601' };

export function unitFromName(name: string): string | undefined {
  if (name in NOT_A_SUFFIX) return NOT_A_SUFFIX[name];
  const base = name.endsWith('_sigma') ? name.slice(0, -'_sigma'.length) : name;
  return SUFFIX_UNITS.find(([suffix]) => base.endsWith(suffix))?.[1];
}

/** A column of a table by its header, as plain text. */
export const col = (t: Table, name: string) => {
  const i = t.header.indexOf(name);
  if (i < 0) throw new Error(`table ${t.heading} has no column ${name}`);
  return (r: string[]) => plain(r[i] ?? '');
};

// Minimal valid messages, for the cross-field rules (`one of`, `unless earth`).
export const EXAMPLE: Record<string, Record<string, unknown>> = {
  oxygen: { v: 1, t: '2026-07-01T00:00:00Z', temp_c: 27, o2_umol_l: 200, o2_mg_l: 6.4, o2_sat_pct: 95 },
  sample: {
    v: 1,
    t: '2026-07-01T00:00:00Z',
    ta_umol_kg: 2300,
    dic_umol_kg: 2000,
    ph_total: 8,
    o2_umol_kg: 200,
  },
  adcp: {
    v: 1,
    t: '2026-07-01T00:00:00Z',
    coord: 'beam',
    blank_m: 0.1,
    bin_m: 0.1,
    vel_m_s: [[0, 0, 0, 0]],
    heading_deg: 0,
    pitch_deg: 0,
    roll_deg: 0,
  },
};
export const accepts = (kind: string, msg: Record<string, unknown>) =>
  validatePayload({ site: 's', station: 'st', kind, sensor: 'x' }, msg).ok;
