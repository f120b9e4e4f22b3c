import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  charData,
  charStrings,
  decodeNetcdf,
  encodeNetcdf,
  NetcdfError,
  type NcAttribute,
  type NcDataset,
  type NcType,
  type NcVariable,
} from './classic.js';

describe('NetCDF classic encoding', () => {
  it('lays out a one-variable file byte by byte as the format specification says', () => {
    const ds: NcDataset = {
      dimensions: [{ name: 'x', length: 2 }],
      attributes: [{ name: 'title', type: 'char', value: 'ab' }],
      variables: [{ name: 'v', dims: ['x'], type: 'short', attributes: [], data: [1, -2] }],
    };
    const b = encodeNetcdf(ds);
    const words = (from: number, n: number) =>
      Array.from({ length: n }, (_, i) => new DataView(b.buffer).getInt32(from + 4 * i));
    expect(Array.from(b.subarray(0, 4))).toEqual([0x43, 0x44, 0x46, 1]); // 'CDF' 1
    // numrecs 0; NC_DIMENSION, 1 dim: name length 1, "x" + 3 pad, length 2
    expect(words(4, 3)).toEqual([0, 0x0a, 1]);
    expect(words(16, 1)).toEqual([1]);
    expect(Array.from(b.subarray(20, 24))).toEqual([0x78, 0, 0, 0]);
    expect(words(24, 1)).toEqual([2]);
    // NC_ATTRIBUTE, 1: name "title" (5 + 3 pad), NC_CHAR, 2 values "ab" + 2 pad
    expect(words(28, 3)).toEqual([0x0c, 1, 5]);
    expect(new TextDecoder().decode(b.subarray(40, 45))).toBe('title');
    expect(words(48, 2)).toEqual([2, 2]);
    expect(new TextDecoder().decode(b.subarray(56, 58))).toBe('ab');
    // NC_VARIABLE, 1: name "v", rank 1, dimid 0, no attributes, NC_SHORT, vsize 4, begin 104 (the header is 104 bytes)
    expect(words(60, 2)).toEqual([0x0b, 1]);
    expect(words(68, 1)).toEqual([1]);
    expect(words(76, 7)).toEqual([1, 0, 0, 0, 3, 4, 104]);
    expect(b.length).toBe(108);
    expect(new DataView(b.buffer).getInt16(104)).toBe(1);
    expect(new DataView(b.buffer).getInt16(106)).toBe(-2);
  });

  it('writes CDF-2 (64-bit begin offsets) on request and reads it back', () => {
    const ds: NcDataset = {
      dimensions: [{ name: 't', length: 3 }],
      attributes: [],
      variables: [
        { name: 'a', dims: ['t'], type: 'double', attributes: [], data: [1.5, Number.NaN, -1e300] },
      ],
    };
    const b = encodeNetcdf(ds, { version: 2 });
    expect(b[3]).toBe(2);
    const back = decodeNetcdf(b);
    expect(Array.from(back.variables[0]!.data)).toEqual([1.5, Number.NaN, -1e300]);
  });

  it('refuses bad names, shapes and undefined dimensions with the reason', () => {
    const v = (over: Partial<NcVariable>): NcDataset => ({
      dimensions: [{ name: 'x', length: 2 }],
      attributes: [],
      variables: [{ name: 'v', dims: ['x'], type: 'int', attributes: [], data: [1, 2], ...over }],
    });
    expect(() => encodeNetcdf(v({ name: '1bad' }))).toThrow(NetcdfError);
    expect(() => encodeNetcdf(v({ data: [1] }))).toThrow(/has 1 values for a shape of 2/);
    expect(() => encodeNetcdf(v({ dims: ['y'] }))).toThrow(/dimension y, which is not defined/);
    expect(() => decodeNetcdf(new Uint8Array([0x43, 0x44, 0x46, 5]))).toThrow(/not a NetCDF classic file/);
    expect(() => decodeNetcdf(encodeNetcdf(v({})).subarray(0, 40))).toThrow(/truncated/);
  });

  it('keeps strings in char variables, UTF-8 included', () => {
    const s = ['ta', 'inverse', 'Ornen récif'];
    const bytes = charData(s, 16);
    expect(charStrings(bytes, 16)).toEqual(s);
  });
});

/** Values a type holds exactly (float: float32-representable; char: bytes). */
const valueOf = (type: NcType): fc.Arbitrary<number> => {
  switch (type) {
    case 'byte':
      return fc.integer({ min: -128, max: 127 });
    case 'char':
      return fc.integer({ min: 0, max: 255 });
    case 'short':
      return fc.integer({ min: -32768, max: 32767 });
    case 'int':
      return fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 });
    case 'float':
      return fc.float({ noNaN: true }).map((x) => Math.fround(x));
    case 'double':
      return fc.double({ noNaN: true });
  }
};
const TYPES: NcType[] = ['byte', 'char', 'short', 'int', 'float', 'double'];
const name = fc.stringMatching(/^[A-Za-z_][A-Za-z0-9_]{0,12}$/);

const attribute: fc.Arbitrary<NcAttribute> = fc.oneof(
  fc.record({ name, type: fc.constant('char' as const), value: fc.string({ maxLength: 40 }) }),
  fc.constantFrom(...(TYPES.filter((t) => t !== 'char') as Exclude<NcType, 'char'>[])).chain((type) =>
    fc.record({
      name,
      type: fc.constant(type),
      value: fc.array(valueOf(type), { minLength: 1, maxLength: 5 }),
    }),
  ),
);
const uniqueByName = <T extends { name: string }>(arb: fc.Arbitrary<T>, max: number) =>
  fc.uniqueArray(arb, { selector: (x) => x.name, maxLength: max });

const dataset: fc.Arbitrary<NcDataset> = uniqueByName(
  fc.record({ name, length: fc.integer({ min: 1, max: 6 }) }),
  3,
).chain((dims) =>
  fc
    .record({
      attributes: uniqueByName(attribute, 4),
      variables: uniqueByName(
        fc
          .record({
            name,
            type: fc.constantFrom(...TYPES),
            dims: fc.subarray(dims.map((d) => d.name)),
            attributes: uniqueByName(attribute, 3),
          })
          .chain((v) => {
            const n = v.dims.reduce((a, d) => a * dims.find((x) => x.name === d)!.length, 1);
            return fc
              .array(valueOf(v.type), { minLength: n, maxLength: n })
              .map((data) => ({ ...v, data }) as NcVariable);
          }),
        5,
      ),
    })
    .map((rest) => ({ dimensions: dims, ...rest })),
);

describe('round trip through our reader', () => {
  it('property: every dataset decodes to what was encoded (CDF-1 and CDF-2)', () => {
    fc.assert(
      fc.property(dataset, fc.constantFrom(1 as const, 2 as const), (ds, version) => {
        const back = decodeNetcdf(encodeNetcdf(ds, { version }));
        expect(back.dimensions).toEqual(ds.dimensions);
        const norm = (a: readonly NcAttribute[]) =>
          a.map((x) => (x.type === 'char' ? x : { ...x, value: Array.from(x.value) }));
        expect(norm(back.attributes)).toEqual(norm(ds.attributes));
        expect(back.variables.length).toBe(ds.variables.length);
        back.variables.forEach((v, i) => {
          const w = ds.variables[i]!;
          expect(v.name).toBe(w.name);
          expect(v.type).toBe(w.type);
          expect(v.dims).toEqual(w.dims);
          expect(norm(v.attributes)).toEqual(norm(w.attributes));
          expect(Array.from(v.data)).toEqual(Array.from(w.data));
        });
      }),
      { numRuns: 300 },
    );
  });
});
