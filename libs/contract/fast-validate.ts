// A fast path for message validation (issue 17): the zod schemas of messages.ts stay the source of truth;
// this compiles each object schema, once at load, into plain checks that decide exactly what zod decides
// and build the object zod would return (the declared keys in the shape's order, unknown keys dropped).
// It answers "accepted, here is the output" or "not sure"; the caller then runs zod, which gives the reason
// (and is the final word if the two ever disagreed). Bursts are checked by one plain loop per array, with
// no call per sample. A schema construct this compiler does not know makes that schema slow-path only,
// never wrongly fast; messages.test.ts and fast-validate.test.ts prove accept/reject equality with zod.
//
// The semantics mirrored are zod 4's (schemas.js and checks.js of the installed version):
// - a number is finite (NaN and +-Infinity are wrong types); bounds inclusive or exclusive as declared;
//   an integer format is Number.isInteger and then within the safe range;
// - string lengths count code points once the UTF-16 length is past the bound (an astral character is
//   one); a regex check resets lastIndex; a refinement accepts on a truthy, non-promise result;
// - an object key is present when `key in value`; an optional key may be absent; a present key holding
//   undefined is kept as undefined; `__proto__` is never copied.
import type { z } from 'zod';

/** Returns zod's output for `raw` when zod accepts it; undefined when zod may reject it (ask zod). */
export type FastObjectValidator = (raw: Record<string, unknown>) => Record<string, unknown> | undefined;

type Test = (value: unknown) => boolean;

interface ZodInternals {
  def: Record<string, unknown> & { type: string; checks?: { _zod: { def: Record<string, unknown> } }[] };
  optin?: string;
  optout?: string;
  values?: Set<unknown>;
}
const internals = (schema: unknown): ZodInternals => (schema as { _zod: ZodInternals })._zod;

class Unsupported extends Error {}

/** Bounds of a number leaf, with null allowed or not (a nullable number, as in `p_dbar`). */
interface NumberLeaf {
  lo: number;
  loIn: boolean;
  hi: number;
  hiIn: boolean;
  int: boolean;
  nullable: boolean;
}

function numberLeaf(schema: unknown, nullable: boolean): NumberLeaf {
  const z = internals(schema);
  const leaf: NumberLeaf = { lo: -Infinity, loIn: true, hi: Infinity, hiIn: true, int: false, nullable };
  if (z.def.check === 'number_format') {
    if (z.def.format !== 'safeint') throw new Unsupported(`number format ${String(z.def.format)}`);
    leaf.int = true;
  } else if (z.def.check !== undefined) throw new Unsupported(`number check ${String(z.def.check)}`);
  for (const c of z.def.checks ?? []) {
    const d = c._zod.def;
    const v = d.value;
    if (typeof v !== 'number') throw new Unsupported('non-numeric bound');
    const inclusive = d.inclusive === true;
    if (d.check === 'greater_than') {
      if (v > leaf.lo || (v === leaf.lo && !inclusive)) [leaf.lo, leaf.loIn] = [v, inclusive];
    } else if (d.check === 'less_than') {
      if (v < leaf.hi || (v === leaf.hi && !inclusive)) [leaf.hi, leaf.hiIn] = [v, inclusive];
    } else throw new Unsupported(`number check ${String(d.check)}`);
  }
  return leaf;
}

function numberOk(x: number, b: NumberLeaf): boolean {
  if (!Number.isFinite(x)) return false;
  if (b.int && !Number.isSafeInteger(x)) return false;
  return (b.loIn ? x >= b.lo : x > b.lo) && (b.hiIn ? x <= b.hi : x < b.hi);
}

/**
 * Every element of `a` a number within `b` (or null where allowed): one plain loop, no call per element.
 * With finite inclusive bounds, `x >= lo && x <= hi` already excludes NaN and the infinities.
 */
function numbersOk(a: readonly unknown[], b: NumberLeaf): boolean {
  const n = a.length;
  const { lo, hi, nullable } = b;
  if (b.loIn && b.hiIn && !b.int && Number.isFinite(lo) && Number.isFinite(hi)) {
    for (let i = 0; i < n; i++) {
      const x = a[i];
      if (typeof x === 'number') {
        if (!(x >= lo && x <= hi)) return false;
      } else if (!(nullable && x === null)) return false;
    }
    return true;
  }
  for (let i = 0; i < n; i++) {
    const x = a[i];
    if (typeof x === 'number') {
      if (!numberOk(x, b)) return false;
    } else if (!(nullable && x === null)) return false;
  }
  return true;
}

/** Zod's code point count of a string: a surrogate pair is one. */
function codePoints(s: string): number {
  let count = s.length;
  for (let i = 0; i < s.length - 1; i++) {
    if ((s.charCodeAt(i) & 0xfc00) === 0xd800 && (s.charCodeAt(i + 1) & 0xfc00) === 0xdc00) {
      count--;
      i++;
    }
  }
  return count;
}

interface Lengths {
  min: number;
  max: number;
  exact: number;
}

function lengthChecks(checks: readonly { _zod: { def: Record<string, unknown> } }[]): {
  lengths: Lengths;
  rest: Record<string, unknown>[];
} {
  const lengths: Lengths = { min: 0, max: Infinity, exact: -1 };
  const rest: Record<string, unknown>[] = [];
  for (const c of checks) {
    const d = c._zod.def;
    if (d.check === 'min_length') lengths.min = Math.max(lengths.min, d.minimum as number);
    else if (d.check === 'max_length') lengths.max = Math.min(lengths.max, d.maximum as number);
    else if (d.check === 'length_equals') {
      if (lengths.exact >= 0 && lengths.exact !== d.length) lengths.max = -1; // nothing fits
      lengths.exact = d.length as number;
    } else rest.push(d);
  }
  return { lengths, rest };
}

/** Zod measures a string in code points, but only counts them when the UTF-16 length is in doubt. */
function stringLengthOk(s: string, l: Lengths): boolean {
  const units = s.length;
  if (units > l.max && codePoints(s) > l.max) return false;
  if (units < l.min) return false;
  if (units < l.min * 2 && codePoints(s) < l.min) return false;
  if (l.exact >= 0) {
    const n = units >= l.exact && units <= l.exact * 2 ? codePoints(s) : units;
    if (n !== l.exact) return false;
  }
  return true;
}

function arrayLengthOk(n: number, l: Lengths): boolean {
  return n >= l.min && n <= l.max && (l.exact < 0 || n === l.exact);
}

function stringTest(schema: unknown): Test {
  const z = internals(schema);
  if (z.def.check !== undefined || z.def.coerce === true)
    throw new Unsupported(`string format ${String(z.def.format)}`);
  const { lengths, rest } = lengthChecks(z.def.checks ?? []);
  const patterns: RegExp[] = [];
  const refinements: ((s: string) => unknown)[] = [];
  for (const d of rest) {
    if (d.check === 'string_format' && d.format === 'regex' && d.pattern instanceof RegExp)
      patterns.push(d.pattern);
    else if (d.check === 'custom' && typeof d.fn === 'function')
      refinements.push(d.fn as (s: string) => unknown);
    else throw new Unsupported(`string check ${String(d.check)}`);
  }
  return (x) => {
    if (typeof x !== 'string' || !stringLengthOk(x, lengths)) return false;
    for (const p of patterns) {
      p.lastIndex = 0;
      if (!p.test(x)) return false;
    }
    for (const fn of refinements) {
      const r = fn(x);
      if (!r || r instanceof Promise) return false;
    }
    return true;
  };
}

/** A number leaf, possibly nullable: the element of a burst. */
function asNumberLeaf(schema: unknown): NumberLeaf | undefined {
  const z = internals(schema);
  if (z.def.type === 'number' && z.def.coerce !== true) return numberLeaf(schema, false);
  if (z.def.type === 'nullable') {
    const inner = internals(z.def.innerType);
    if (inner.def.type === 'number' && inner.def.coerce !== true) return numberLeaf(z.def.innerType, true);
  }
  return undefined;
}

function arrayTest(schema: unknown): Test {
  const z = internals(schema);
  const { lengths, rest } = lengthChecks(z.def.checks ?? []);
  if (rest.length > 0) throw new Unsupported(`array check ${String(rest[0]?.check)}`);
  const leaf = asNumberLeaf(z.def.element);
  if (leaf !== undefined)
    return (x) => Array.isArray(x) && arrayLengthOk(x.length, lengths) && numbersOk(x, leaf);
  // Arrays of fixed small arrays of numbers (ADCP bins): two plain loops.
  const el = internals(z.def.element);
  if (el.def.type === 'array') {
    const inner = lengthChecks(el.def.checks ?? []);
    const innerLeaf = asNumberLeaf(el.def.element);
    if (inner.rest.length === 0 && innerLeaf !== undefined) {
      return (x) => {
        if (!Array.isArray(x) || !arrayLengthOk(x.length, lengths)) return false;
        for (let i = 0; i < x.length; i++) {
          const row: unknown = x[i];
          if (!Array.isArray(row) || !arrayLengthOk(row.length, inner.lengths) || !numbersOk(row, innerLeaf))
            return false;
        }
        return true;
      };
    }
  }
  const element = compileTest(z.def.element);
  return (x) => {
    if (!Array.isArray(x) || !arrayLengthOk(x.length, lengths)) return false;
    for (let i = 0; i < x.length; i++) if (!element(x[i])) return false;
    return true;
  };
}

function compileTest(schema: unknown): Test {
  const z = internals(schema);
  const noChecks = () => {
    if ((z.def.checks ?? []).length > 0) throw new Unsupported(`checks on ${z.def.type}`);
  };
  switch (z.def.type) {
    case 'number': {
      if (z.def.coerce === true) throw new Unsupported('coerced number');
      const b = numberLeaf(schema, false);
      return (x) => typeof x === 'number' && numberOk(x, b);
    }
    case 'string':
      return stringTest(schema);
    case 'boolean':
      noChecks();
      if (z.def.coerce === true) throw new Unsupported('coerced boolean');
      return (x) => typeof x === 'boolean';
    case 'literal':
    case 'enum': {
      noChecks();
      const values = z.values;
      if (values === undefined) throw new Unsupported(`${z.def.type} without values`);
      return (x) => values.has(x);
    }
    case 'optional': {
      noChecks();
      if (internals(z.def.innerType).optin === 'defaulted') throw new Unsupported('optional default');
      const inner = compileTest(z.def.innerType);
      return (x) => x === undefined || inner(x);
    }
    case 'nullable': {
      noChecks();
      const inner = compileTest(z.def.innerType);
      return (x) => x === null || inner(x);
    }
    case 'array':
      return arrayTest(schema);
    default:
      throw new Unsupported(`schema type ${z.def.type}`);
  }
}

interface Field {
  key: string;
  test: Test;
  /** Absence allowed (zod's optin and optout both "optional"). */
  omittable: boolean;
}

/**
 * Compiles a zod object schema (strip mode) into a fast validator, or returns undefined when the schema
 * uses something this compiler does not mirror (that schema then always goes through zod).
 */
export function compileObjectValidator(schema: z.ZodType): FastObjectValidator | undefined {
  try {
    const z = internals(schema);
    if (z.def.type !== 'object' || z.def.catchall !== undefined || (z.def.checks ?? []).length > 0)
      return undefined;
    const shape = z.def.shape as Record<string, unknown>;
    if (Object.getOwnPropertySymbols(shape).length > 0) return undefined;
    const fields: Field[] = [];
    for (const key of Object.keys(shape)) {
      if (key === '__proto__') continue;
      const f = internals(shape[key]);
      if (f.optin !== undefined && f.optin !== 'optional') return undefined;
      const omittable = f.optin === 'optional' && f.optout === 'optional';
      if (f.optin === 'optional' && !omittable) return undefined;
      fields.push({ key, test: compileTest(shape[key]), omittable });
    }
    return (raw) => validateObject(fields, raw);
  } catch (err) {
    if (err instanceof Unsupported) return undefined;
    throw err;
  }
}

function validateObject(
  fields: readonly Field[],
  raw: Record<string, unknown>,
): Record<string, unknown> | undefined {
  const out: Record<string, unknown> = {};
  for (let i = 0; i < fields.length; i++) {
    const f = fields[i] as Field;
    const v = raw[f.key];
    if (v === undefined && !(f.key in raw)) {
      if (f.omittable) continue;
      return undefined;
    }
    if (!f.test(v)) return undefined;
    out[f.key] = v;
  }
  return out;
}

/** Compiles every schema of a table (e.g. one per message kind); kinds left out go through zod alone. */
export function compileValidators<K extends string>(
  schemas: Readonly<Record<K, z.ZodType>>,
): Partial<Record<K, FastObjectValidator>> {
  const out: Partial<Record<K, FastObjectValidator>> = {};
  for (const key of Object.keys(schemas) as K[]) {
    const v = compileObjectValidator(schemas[key]);
    if (v !== undefined) out[key] = v;
  }
  return out;
}
