// The fast validation path decides exactly what zod decides (zod is the oracle, run beside it on every
// input), returns the same object (keys, order, values), and gives parseMessage the same results.
// Inputs: the contract's examples for all 8 kinds, mutated field by field with edge values (every bound of
// the schemas and the doubles next to it, -0, NaN and the infinities as numbers and as strings, wrong
// types, astral characters at string length bounds), resized arrays up to past the burst limit, prototype
// keys as own keys and inherited fields; and arbitrary JSON values.
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { compileObjectValidator, compileValidators } from './fast-validate.js';
import { KINDS, type Kind } from './ids.js';
import {
  MAX_PRESSURE_SAMPLES,
  MESSAGE_SCHEMAS,
  fastValidatedKinds,
  parseMessage,
  validatePayload,
  validatePayloadZod,
} from './messages.js';

interface Good {
  topic: string;
  msg: Record<string, unknown>;
}
const good = JSON.parse(
  readFileSync(new URL('../../test/fixtures/messages/good.json', import.meta.url), 'utf8'),
) as Good[];
const kindOf = (topic: string) => topic.split('/')[3] as Kind;
const partsOf = (kind: string) => ({ site: 'demo-reef', station: 'crest', kind, sensor: 'x' });
const fast = compileValidators<Kind>(MESSAGE_SCHEMAS);

type Shape = Record<string, z.ZodType>;
const shapeOf = (kind: Kind) => (MESSAGE_SCHEMAS[kind] as unknown as { shape: Shape }).shape;

/** Every numeric bound and length bound written in the schemas (for edge values), found by walking them. */
function bounds(): { numbers: number[]; lengths: number[] } {
  const numbers = new Set<number>();
  const lengths = new Set<number>();
  const walk = (s: unknown) => {
    const d = (s as { _zod: { def: Record<string, unknown> } })._zod.def;
    for (const c of (d.checks ?? []) as { _zod: { def: Record<string, unknown> } }[]) {
      const cd = c._zod.def;
      if (typeof cd.value === 'number') numbers.add(cd.value);
      for (const k of ['minimum', 'maximum', 'length'])
        if (typeof cd[k] === 'number') lengths.add(cd[k] as number);
    }
    for (const k of ['innerType', 'element']) if (d[k] !== undefined) walk(d[k]);
  };
  for (const kind of KINDS) for (const s of Object.values(shapeOf(kind))) walk(s);
  return { numbers: [...numbers], lengths: [...lengths] };
}
const B = bounds();

function nextUp(x: number): number {
  if (x === 0) return Number.MIN_VALUE;
  const b = new Float64Array([x]);
  const u = new BigInt64Array(b.buffer);
  u[0] = (u[0] as bigint) + (x > 0 ? 1n : -1n);
  return b[0] as number;
}
const nextDown = (x: number) => -nextUp(-x);

const edgeNumbers = [
  ...B.numbers.flatMap((x) => [x, nextUp(x), nextDown(x), x + 1e-9, x - 1e-9]),
  0,
  -0,
  1,
  1.5,
  -1,
  Number.MIN_VALUE,
  Number.MAX_VALUE,
  -Number.MAX_VALUE,
  Number.MAX_SAFE_INTEGER + 1,
  Number.MAX_SAFE_INTEGER + 2,
  NaN,
  Infinity,
  -Infinity,
];
const astral = '\u{1F41F}'; // one code point, two UTF-16 units
const edgeStrings = [
  'NaN',
  'Infinity',
  '-Infinity',
  '1e400',
  '1',
  '',
  '27.5',
  'beam',
  'inst',
  'earth',
  'Beam',
  'ctd',
  '__proto__',
  '2026-03-01T06:00:00Z',
  '2026-02-29T06:00:00Z',
  '2028-02-29T06:00:00Z',
  '2026-04-31T00:00:00Z',
  '2026-03-01T06:00Z',
  '2026-03-01T06:00:00',
  '2026-03-01T06:00:00.123456789+10:00',
  '2026-03-01T06:00:00.1234567891Z',
  '2026-03-01T06:00:00-0330',
  '1999-12-31T23:59:59Z',
  '2000-01-01T00:00:00Z',
  '2099-12-31T23:59:59.999Z',
  '2100-01-01T00:00:00Z',
  '2026-13-01T00:00:00Z',
  ...B.lengths.flatMap((n) => ['a'.repeat(n), 'a'.repeat(n + 1), 'a'.repeat(Math.max(0, n - 1)) + astral]),
  'A-b_c.9',
  '-abc',
  'a b',
];

const leaf: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 6, arbitrary: fc.constantFrom(...edgeNumbers) },
  { weight: 2, arbitrary: fc.double() },
  { weight: 1, arbitrary: fc.integer() },
  { weight: 4, arbitrary: fc.constantFrom(...edgeStrings) },
  { weight: 1, arbitrary: fc.string() },
  { weight: 1, arbitrary: fc.date({ noInvalidDate: true }).map((d) => d.toISOString()) },
  { weight: 2, arbitrary: fc.constantFrom(null, true, false, {}, [], undefined) },
);
const value: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 8, arbitrary: leaf },
  { weight: 2, arbitrary: fc.array(leaf, { maxLength: 6 }) },
  { weight: 2, arbitrary: fc.array(fc.array(leaf, { minLength: 3, maxLength: 5 }), { maxLength: 4 }) },
  { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 2 }) },
);

const prototypeKeys = ['__proto__', 'constructor', 'toString', 'hasOwnProperty', 'valueOf', 'prototype'];

type Mutation =
  | { op: 'set'; key: string; value: unknown }
  | { op: 'delete'; key: string }
  | { op: 'resize'; key: string; length: number; at: number; value: unknown; inner: boolean }
  | { op: 'element'; key: string; at: number; value: unknown; inner: boolean };

function mutationFor(kind: Kind): fc.Arbitrary<Mutation> {
  const keys = [...Object.keys(shapeOf(kind)), ...prototypeKeys, 'note', 'o2_umol_kg'];
  const arrays = Object.keys(shapeOf(kind)).filter((k) =>
    ['p_dbar', 'vel_m_s', 'corr_pct', 'echo'].includes(k),
  );
  const key = fc.constantFrom(...keys);
  const lengths = [...B.lengths.flatMap((n) => [n - 1, n, n + 1]), 0, 2, 64].filter((n) => n >= 0);
  const ops: fc.Arbitrary<Mutation>[] = [
    fc.record({ op: fc.constant('set' as const), key, value }),
    fc.record({ op: fc.constant('delete' as const), key }),
  ];
  if (arrays.length > 0) {
    const akey = fc.constantFrom(...arrays);
    ops.push(
      fc.record({
        op: fc.constant('resize' as const),
        key: akey,
        length: fc.constantFrom(...lengths),
        at: fc.nat(),
        value,
        inner: fc.boolean(),
      }),
      fc.record({ op: fc.constant('element' as const), key: akey, at: fc.nat(), value, inner: fc.boolean() }),
    );
  }
  return fc.oneof(...ops);
}

/** Sets an own property even for `__proto__` (as JSON.parse does). */
function setOwn(o: Record<string, unknown>, key: string, v: unknown): void {
  Object.defineProperty(o, key, { value: v, enumerable: true, writable: true, configurable: true });
}

function apply(base: Record<string, unknown>, muts: readonly Mutation[]): Record<string, unknown> {
  const o = structuredClone(base);
  for (const m of muts) {
    if (m.op === 'set') setOwn(o, m.key, m.value);
    else if (m.op === 'delete') delete o[m.key];
    else {
      const arr = o[m.key];
      if (!Array.isArray(arr) || arr.length === 0) continue;
      let next: unknown[] = arr;
      if (m.op === 'resize') {
        // Grow by repeating the existing elements (valid ones), shrink by cutting.
        next = Array.from({ length: m.length }, (_, i) => structuredClone(arr[i % arr.length]));
        if (next.length === 0) {
          o[m.key] = next;
          continue;
        }
      }
      const i = m.at % next.length;
      const row = next[i];
      if (m.inner && Array.isArray(row) && row.length > 0) row[m.at % row.length] = m.value;
      else next[i] = m.value;
      o[m.key] = next;
    }
  }
  return o;
}

let accepted = 0;
let checked = 0;

/** The fast validator and zod agree, and validatePayload returns what the zod path returns. */
function agree(kind: string, raw: unknown): void {
  checked++;
  if (
    raw !== null &&
    typeof raw === 'object' &&
    !Array.isArray(raw) &&
    (KINDS as readonly string[]).includes(kind)
  ) {
    const zr = MESSAGE_SCHEMAS[kind as Kind].safeParse(raw);
    const fr = fast[kind as Kind]?.(raw as Record<string, unknown>);
    expect(fr !== undefined).toBe(zr.success);
    if (zr.success) {
      accepted++;
      expect(fr).toStrictEqual(zr.data);
      expect(Object.keys(fr as object)).toEqual(Object.keys(zr.data));
    }
  }
  const a = validatePayload(partsOf(kind), raw);
  const b = validatePayloadZod(partsOf(kind), raw);
  expect(a).toStrictEqual(b);
  if (a.ok && b.ok) expect(Object.keys(a.message)).toEqual(Object.keys(b.message));
}

describe('fast validation', () => {
  it('covers every message kind', () => {
    expect(fastValidatedKinds().sort()).toEqual([...KINDS].sort());
  });

  it('accepts every contract example with the object zod returns', () => {
    for (const g of good) {
      const kind = kindOf(g.topic);
      const out = fast[kind]?.(g.msg);
      expect(out).toStrictEqual(MESSAGE_SCHEMAS[kind].parse(g.msg));
      agree(kind, g.msg);
    }
  });

  it('agrees with zod on mutated examples of all 8 kinds', () => {
    accepted = 0;
    checked = 0;
    const example = fc
      .constantFrom(...good)
      .chain((g) =>
        fc.tuple(fc.constant(g), fc.array(mutationFor(kindOf(g.topic)), { minLength: 1, maxLength: 3 })),
      );
    fc.assert(
      fc.property(example, ([g, muts]) => agree(kindOf(g.topic), apply(g.msg, muts))),
      { numRuns: 6000 },
    );
    // The generator must reach both sides of the decision, or the property proves little.
    expect(accepted / checked).toBeGreaterThan(0.1);
    expect(accepted / checked).toBeLessThan(0.9);
  });

  it('agrees with zod on arbitrary values of every kind', () => {
    fc.assert(
      fc.property(fc.constantFrom(...KINDS, 'unknown'), fc.oneof(fc.anything(), fc.jsonValue()), agree),
      { numRuns: 2000 },
    );
  });

  it('agrees with zod on objects built from the schema keys', () => {
    const obj = fc
      .constantFrom(...KINDS)
      .chain((kind) =>
        fc.tuple(
          fc.constant(kind),
          fc.dictionary(fc.constantFrom(...Object.keys(shapeOf(kind)), ...prototypeKeys), value),
        ),
      );
    fc.assert(
      fc.property(obj, ([kind, o]) => agree(kind, o)),
      { numRuns: 3000 },
    );
  });

  it('reads inherited fields and prototype keys as zod does', () => {
    const ctd = good.find((g) => kindOf(g.topic) === 'ctd')!.msg;
    agree('ctd', Object.create(ctd));
    agree('ctd', Object.assign(Object.create({ sal: 99 }), { ...ctd, sal: undefined }));
    agree('ctd', Object.assign(Object.create(null), ctd));
    agree('ctd', JSON.parse(`{"__proto__":{"v":1},${JSON.stringify(ctd).slice(1)}`));
    agree('ctd', { ...ctd, seq: undefined });
    agree('ctd', { ...ctd, temp_c: undefined });
  });

  it('covers the reference oxygen of a bottle sample (o2_umol_kg) at and past its bounds', () => {
    const sample = good.find((g) => kindOf(g.topic) === 'sample')!.msg;
    expect(Object.keys(shapeOf('sample'))).toContain('o2_umol_kg');
    const decided: boolean[] = [];
    for (const o2 of [0, -0, 212.4, 1000, nextUp(1000), nextDown(0), NaN, '212', null]) {
      agree('sample', { ...sample, o2_umol_kg: o2 });
      decided.push(validatePayload(partsOf('sample'), { ...sample, o2_umol_kg: o2 }).ok);
      // Alone, it is the one result the sample carries.
      const alone = { v: 1, t: '2026-03-01T06:00:00Z', o2_umol_kg: o2 };
      agree('sample', alone);
    }
    expect(decided).toEqual([true, true, true, true, false, false, false, false, false]);
  });

  it('checks a burst at the sample limit and just past it', () => {
    const p = good.find((g) => kindOf(g.topic) === 'pressure')!.msg;
    const full = Array.from({ length: MAX_PRESSURE_SAMPLES }, (_, i) => 10 + Math.sin(i / 7));
    for (const [len, at, bad] of [
      [MAX_PRESSURE_SAMPLES, 9000, null],
      [MAX_PRESSURE_SAMPLES, 9000, NaN],
      [MAX_PRESSURE_SAMPLES, 16383, 1000.0000001],
      [MAX_PRESSURE_SAMPLES, 0, -0],
      [MAX_PRESSURE_SAMPLES, 5, '10.2'],
      [MAX_PRESSURE_SAMPLES + 1, 0, 10],
    ] as const) {
      const arr: unknown[] = full.slice(0, Math.min(len, full.length));
      while (arr.length < len) arr.push(10);
      arr[at] = bad;
      agree('pressure', { ...p, p_dbar: arr });
    }
    const r = validatePayload(partsOf('pressure'), { ...p, p_dbar: full });
    expect(r.ok).toBe(true);
  });

  it('gives parseMessage the zod results on JSON text (1e400, -0, exponents)', () => {
    const texts = [
      '{"v":1,"t":"2026-03-01T06:00:00Z","temp_c":1e400,"sal":35}',
      '{"v":1,"t":"2026-03-01T06:00:00Z","temp_c":-0,"sal":35}',
      '{"v":1,"t":"2026-03-01T06:00:00Z","temp_c":2.7E1,"sal":3.5e1,"seq":1e2}',
      '{"v":1.0,"t":"2026-03-01T06:00:00Z","temp_c":27,"sal":35,"seq":1.5}',
      '{"v":1,"t":"2026-03-01T06:00:00Z","temp_c":27,"sal":35,"seq":9007199254740993}',
    ];
    for (const text of texts) {
      const got = parseMessage('reef/demo-reef/crest/ctd/x', text);
      expect(got).toStrictEqual(validatePayloadZod(partsOf('ctd'), JSON.parse(text)));
    }
    expect(parseMessage('reef/demo-reef/crest/ctd/x', texts[1]!).ok).toBe(true);
    expect(parseMessage('reef/demo-reef/crest/ctd/x', texts[0]!).ok).toBe(false);
  });
});

describe('schemas the compiler does not mirror go to zod alone', () => {
  it('returns no fast validator for them', () => {
    expect(compileObjectValidator(z.object({ a: z.number().multipleOf(2) }))).toBeUndefined();
    expect(compileObjectValidator(z.object({ a: z.string().email() }))).toBeUndefined();
    expect(compileObjectValidator(z.object({ a: z.number().default(1) }))).toBeUndefined();
    expect(compileObjectValidator(z.object({ a: z.number() }).strict())).toBeUndefined();
    expect(compileObjectValidator(z.object({ a: z.number().transform((x) => x * 2) }))).toBeUndefined();
    expect(compileObjectValidator(z.string())).toBeUndefined();
  });

  it('mirrors what it does compile, including code point lengths and exclusive bounds', () => {
    const s = z.object({
      k: z.string().min(2).max(3),
      n: z.number().gt(0).lt(1),
      i: z.int().min(-2).optional(),
      e: z.array(z.string().length(2)).max(2).optional(),
      u: z.number().optional(),
      b: z.array(z.number().nullable()).optional(),
    });
    const f = compileObjectValidator(s)!;
    expect(f).toBeDefined();
    const cases: unknown[] = [
      { k: 'ab', n: 0.5 },
      { k: `ab${astral}`, n: 0.5 },
      { k: `${astral}`, n: 0.5 },
      { k: `a${astral}${astral}`, n: 0.5 },
      { k: 'abcd', n: 0.5 },
      { k: 'ab', n: 0 },
      { k: 'ab', n: 1 },
      { k: 'ab', n: nextDown(1) },
      { k: 'ab', n: 0.5, i: -2 },
      { k: 'ab', n: 0.5, i: -3 },
      { k: 'ab', n: 0.5, i: 1.5 },
      { k: 'ab', n: 0.5, e: [astral, 'xy'] },
      { k: 'ab', n: 0.5, e: [`${astral}${astral}`] },
      { k: 'ab', n: 0.5, e: ['x', 'y', 'z'] },
      { k: 'ab', n: 0.5, u: Infinity },
      { k: 'ab', n: 0.5, u: -Infinity },
      { k: 'ab', n: 0.5, u: NaN },
      { k: 'ab', n: 0.5, u: -Number.MAX_VALUE },
      { k: 'ab', n: 0.5, b: [1, null, -Infinity] },
      { k: 'ab', n: 0.5, b: [1, null, NaN] },
      { k: 'ab', n: 0.5, b: [1, null, 2] },
    ];
    for (const c of cases) {
      const zr = s.safeParse(c);
      const fr = f(c as Record<string, unknown>);
      expect({ c, accepted: fr !== undefined }).toEqual({ c, accepted: zr.success });
      if (zr.success) expect(fr).toStrictEqual(zr.data);
    }
  });
});
