// A small writer and reader of the NetCDF classic format (CDF-1, and CDF-2 with 64-bit offsets), as
// specified in "The NetCDF Classic Format Specification" (Unidata, NetCDF Users Guide, appendix): a header of
// dimensions, global attributes and variables, then each variable's values, big-endian, every part padded
// to 4 bytes. Only fixed-size dimensions are written (no record dimension); the reader accepts what the
// writer writes plus record-free files of other writers. Pure: bytes in, bytes out.
import { errorMessage, ReefdError } from '../contract/errors.js';
import { NETCDF_ERRORS, type NetcdfErrorCode } from './errors.js';

export type NcType = 'byte' | 'char' | 'short' | 'int' | 'float' | 'double';

const TYPE_CODE: Record<NcType, number> = { byte: 1, char: 2, short: 3, int: 4, float: 5, double: 6 };
const TYPE_SIZE: Record<NcType, number> = { byte: 1, char: 1, short: 2, int: 4, float: 4, double: 8 };
const CODE_TYPE = new Map<number, NcType>(Object.entries(TYPE_CODE).map(([k, v]) => [v, k as NcType]));

const NC_DIMENSION = 0x0a;
const NC_VARIABLE = 0x0b;
const NC_ATTRIBUTE = 0x0c;

/** Names of the classic model (letters, digits, underscore and .@+- after the first character). */
export const NC_NAME = /^[A-Za-z_][A-Za-z0-9_.@+-]{0,255}$/;

export interface NcDimension {
  name: string;
  length: number;
}

/** An attribute: text (type char) or numbers of a numeric type. */
export type NcAttribute =
  | { name: string; type: 'char'; value: string }
  | { name: string; type: Exclude<NcType, 'char'>; value: readonly number[] };

export interface NcVariable {
  name: string;
  /** Dimension names, slowest varying first. Empty for a scalar. */
  dims: readonly string[];
  type: NcType;
  attributes: readonly NcAttribute[];
  /** Values in row-major order; for char, the bytes (see charData). */
  data: ArrayLike<number>;
}

export interface NcDataset {
  dimensions: readonly NcDimension[];
  attributes: readonly NcAttribute[];
  variables: readonly NcVariable[];
}

/** What is wrong with a dataset (never retriable); the message names the case and the fix. */
export class NetcdfError extends ReefdError<NetcdfErrorCode> {
  constructor(what: string) {
    const code = 'REEFD_NETCDF_INVALID';
    super(code, errorMessage(code, what, NETCDF_ERRORS.text(code)));
    this.name = 'NetcdfError';
  }
}

const utf8 = new TextEncoder();
const utf8Decoder = new TextDecoder('utf-8');
const pad4 = (n: number): number => (4 - (n % 4)) % 4;

/** Strings as a char variable's bytes, each padded with zero bytes to strlen (UTF-8; cut at strlen bytes). */
export function charData(strings: readonly string[], strlen: number): Uint8Array {
  const out = new Uint8Array(strings.length * strlen);
  strings.forEach((s, i) => out.set(utf8.encode(s).subarray(0, strlen), i * strlen));
  return out;
}

/** Longest UTF-8 byte length of the strings (at least 1: a zero-length dimension is not allowed here). */
export function maxByteLength(strings: Iterable<string>): number {
  let n = 1;
  for (const s of strings) n = Math.max(n, utf8.encode(s).length);
  return n;
}

/** The strings of a char variable with a trailing string-length dimension (trailing zero bytes dropped). */
export function charStrings(bytes: ArrayLike<number>, strlen: number): string[] {
  const out: string[] = [];
  const u = Uint8Array.from(bytes);
  for (let i = 0; i + strlen <= u.length; i += strlen) {
    let end = i + strlen;
    while (end > i && u[end - 1] === 0) end--;
    out.push(utf8Decoder.decode(u.subarray(i, end)));
  }
  return out;
}

function shapeOf(ds: NcDataset, v: NcVariable): number[] {
  return v.dims.map((d) => {
    const dim = ds.dimensions.find((x) => x.name === d);
    if (dim === undefined)
      throw new NetcdfError(`variable ${v.name} uses dimension ${d}, which is not defined`);
    return dim.length;
  });
}

function validate(ds: NcDataset): void {
  const names = new Set<string>();
  for (const d of ds.dimensions) {
    if (!NC_NAME.test(d.name)) throw new NetcdfError(`bad dimension name ${JSON.stringify(d.name)}`);
    if (!Number.isInteger(d.length) || d.length < 1 || d.length > 2 ** 31 - 1)
      throw new NetcdfError(`dimension ${d.name} must have a length of 1 to 2^31-1 (got ${d.length})`);
    if (names.has(`d:${d.name}`)) throw new NetcdfError(`dimension ${d.name} is defined twice`);
    names.add(`d:${d.name}`);
  }
  const attrs = (list: readonly NcAttribute[], owner: string) => {
    const seen = new Set<string>();
    for (const a of list) {
      if (!NC_NAME.test(a.name))
        throw new NetcdfError(`bad attribute name ${JSON.stringify(a.name)} on ${owner}`);
      if (seen.has(a.name)) throw new NetcdfError(`attribute ${a.name} is defined twice on ${owner}`);
      seen.add(a.name);
    }
  };
  attrs(ds.attributes, 'the dataset');
  for (const v of ds.variables) {
    if (!NC_NAME.test(v.name)) throw new NetcdfError(`bad variable name ${JSON.stringify(v.name)}`);
    if (names.has(`v:${v.name}`)) throw new NetcdfError(`variable ${v.name} is defined twice`);
    names.add(`v:${v.name}`);
    attrs(v.attributes, v.name);
    const n = shapeOf(ds, v).reduce((a, b) => a * b, 1);
    if (v.data.length !== n)
      throw new NetcdfError(`variable ${v.name} has ${v.data.length} values for a shape of ${n}`);
  }
}

/** Sequential big-endian writer into a buffer of known size. */
class Out {
  readonly bytes: Uint8Array;
  readonly view: DataView;
  pos = 0;
  constructor(size: number) {
    this.bytes = new Uint8Array(size);
    this.view = new DataView(this.bytes.buffer);
  }
  int(x: number): void {
    this.view.setInt32(this.pos, x);
    this.pos += 4;
  }
  offset(x: number, v2: boolean): void {
    if (v2) {
      this.view.setBigInt64(this.pos, BigInt(x));
      this.pos += 8;
    } else this.int(x);
  }
  raw(b: Uint8Array): void {
    this.bytes.set(b, this.pos);
    this.pos += b.length + pad4(b.length);
  }
  name(s: string): void {
    const b = utf8.encode(s.normalize('NFC'));
    this.int(b.length);
    this.raw(b);
  }
  values(type: NcType, data: ArrayLike<number>): void {
    const v = this.view;
    let p = this.pos;
    const n = data.length;
    switch (type) {
      case 'byte':
        for (let i = 0; i < n; i++) v.setInt8(p++, data[i] as number);
        break;
      case 'char':
        for (let i = 0; i < n; i++) v.setUint8(p++, data[i] as number);
        break;
      case 'short':
        for (let i = 0; i < n; i++, p += 2) v.setInt16(p, data[i] as number);
        break;
      case 'int':
        for (let i = 0; i < n; i++, p += 4) v.setInt32(p, data[i] as number);
        break;
      case 'float':
        for (let i = 0; i < n; i++, p += 4) v.setFloat32(p, data[i] as number);
        break;
      case 'double':
        for (let i = 0; i < n; i++, p += 8) v.setFloat64(p, data[i] as number);
        break;
    }
    this.pos = p + pad4(p - this.pos);
  }
}

const nameBytes = (s: string): number => {
  const n = utf8.encode(s.normalize('NFC')).length;
  return 4 + n + pad4(n);
};
const attrBytes = (a: NcAttribute): number => {
  const n = a.type === 'char' ? utf8.encode(a.value).length : a.value.length * TYPE_SIZE[a.type];
  return nameBytes(a.name) + 4 + 4 + n + pad4(n);
};
const listBytes = <T>(items: readonly T[], size: (x: T) => number): number =>
  8 + items.reduce((s, x) => s + size(x), 0);

function headerSize(ds: NcDataset, v2: boolean): number {
  let n = 4 + 4; // magic, numrecs
  n += listBytes(ds.dimensions, (d) => nameBytes(d.name) + 4);
  n += listBytes(ds.attributes, attrBytes);
  n += listBytes(
    ds.variables,
    (v) =>
      nameBytes(v.name) + 4 + 4 * v.dims.length + listBytes(v.attributes, attrBytes) + 4 + 4 + (v2 ? 8 : 4),
  );
  return n;
}

function writeAttrs(out: Out, list: readonly NcAttribute[]): void {
  if (list.length === 0) {
    out.int(0);
    out.int(0);
    return;
  }
  out.int(NC_ATTRIBUTE);
  out.int(list.length);
  for (const a of list) {
    out.name(a.name);
    out.int(TYPE_CODE[a.type]);
    if (a.type === 'char') {
      const b = utf8.encode(a.value);
      out.int(b.length);
      out.raw(b);
    } else {
      out.int(a.value.length);
      out.values(a.type, a.value);
    }
  }
}

/**
 * Encodes a dataset. CDF-1 (32-bit offsets) when every variable starts below 2 GiB, else CDF-2; force one
 * with `version`. Throws NetcdfError for names, shapes or sizes the format cannot hold.
 */
export function encodeNetcdf(ds: NcDataset, opts: { version?: 1 | 2 } = {}): Uint8Array {
  validate(ds);
  const vsize = ds.variables.map((v) => {
    const n = shapeOf(ds, v).reduce((a, b) => a * b, 1) * TYPE_SIZE[v.type];
    return n + pad4(n);
  });
  const total = (v2: boolean) => headerSize(ds, v2) + vsize.reduce((a, b) => a + b, 0);
  const lastBegin = (v2: boolean) => total(v2) - (vsize.at(-1) ?? 0);
  const v2 = opts.version === 2 || (opts.version === undefined && lastBegin(false) > 2 ** 31 - 1);
  if (!v2 && lastBegin(false) > 2 ** 31 - 1) throw new NetcdfError('too large for CDF-1; use version 2');
  const out = new Out(total(v2));
  out.raw(Uint8Array.of(0x43, 0x44, 0x46, v2 ? 2 : 1));
  out.int(0); // numrecs: no record dimension
  if (ds.dimensions.length === 0) {
    out.int(0);
    out.int(0);
  } else {
    out.int(NC_DIMENSION);
    out.int(ds.dimensions.length);
    for (const d of ds.dimensions) {
      out.name(d.name);
      out.int(d.length);
    }
  }
  writeAttrs(out, ds.attributes);
  const dimIndex = new Map(ds.dimensions.map((d, i) => [d.name, i]));
  let begin = headerSize(ds, v2);
  if (ds.variables.length === 0) {
    out.int(0);
    out.int(0);
  } else {
    out.int(NC_VARIABLE);
    out.int(ds.variables.length);
    ds.variables.forEach((v, i) => {
      out.name(v.name);
      out.int(v.dims.length);
      for (const d of v.dims) out.int(dimIndex.get(d) as number);
      writeAttrs(out, v.attributes);
      out.int(TYPE_CODE[v.type]);
      // vsize is a 32-bit field; a variable of 4 GiB or more records 2^32-1 (readers compute it instead).
      out.int(Math.min(vsize[i] as number, 2 ** 32 - 1) | 0);
      out.offset(begin, v2);
      begin += vsize[i] as number;
    });
  }
  for (const v of ds.variables) out.values(v.type, v.data);
  return out.bytes;
}

/** Sequential big-endian reader. */
class In {
  readonly view: DataView;
  pos = 0;
  constructor(readonly bytes: Uint8Array) {
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }
  need(n: number): void {
    if (this.pos + n > this.bytes.length) throw new NetcdfError(`truncated file at byte ${this.pos}`);
  }
  int(): number {
    this.need(4);
    const x = this.view.getInt32(this.pos);
    this.pos += 4;
    return x;
  }
  offset(v2: boolean): number {
    if (!v2) return this.int() >>> 0;
    this.need(8);
    const x = Number(this.view.getBigInt64(this.pos));
    this.pos += 8;
    return x;
  }
  raw(n: number): Uint8Array {
    this.need(n + pad4(n));
    const b = this.bytes.subarray(this.pos, this.pos + n);
    this.pos += n + pad4(n);
    return b;
  }
  name(): string {
    const n = this.int();
    if (n < 0 || n > 4096) throw new NetcdfError(`bad name length ${n}`);
    return utf8Decoder.decode(this.raw(n));
  }
}

function readValues(view: DataView, pos: number, type: NcType, n: number): number[] | Float64Array {
  const size = TYPE_SIZE[type];
  if (pos + n * size > view.byteLength) throw new NetcdfError('variable data past the end of the file');
  if (type === 'double') {
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = view.getFloat64(pos + 8 * i);
    return out;
  }
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const p = pos + size * i;
    out[i] =
      type === 'byte'
        ? view.getInt8(p)
        : type === 'char'
          ? view.getUint8(p)
          : type === 'short'
            ? view.getInt16(p)
            : type === 'int'
              ? view.getInt32(p)
              : view.getFloat32(p);
  }
  return out;
}

function readAttrs(r: In): NcAttribute[] {
  const tag = r.int();
  const n = r.int();
  if (tag === 0 && n === 0) return [];
  if (tag !== NC_ATTRIBUTE) throw new NetcdfError(`expected an attribute list at byte ${r.pos - 8}`);
  const out: NcAttribute[] = [];
  for (let i = 0; i < n; i++) {
    const name = r.name();
    const type = CODE_TYPE.get(r.int());
    if (type === undefined) throw new NetcdfError(`attribute ${name} has an unknown type`);
    const count = r.int();
    if (type === 'char') out.push({ name, type, value: utf8Decoder.decode(r.raw(count)) });
    else {
      const bytes = count * TYPE_SIZE[type];
      r.need(bytes + pad4(bytes));
      out.push({ name, type, value: Array.from(readValues(r.view, r.pos, type, count)) });
      r.pos += bytes + pad4(bytes);
    }
  }
  return out;
}

/** Decodes a classic (CDF-1 or CDF-2) file without a record dimension. */
export function decodeNetcdf(bytes: Uint8Array): NcDataset {
  const r = new In(bytes);
  const magic = r.raw(4);
  if (magic[0] !== 0x43 || magic[1] !== 0x44 || magic[2] !== 0x46 || (magic[3] !== 1 && magic[3] !== 2))
    throw new NetcdfError('not a NetCDF classic file (CDF-1 or CDF-2)');
  const v2 = magic[3] === 2;
  r.int(); // numrecs
  const dimensions: NcDimension[] = [];
  {
    const tag = r.int();
    const n = r.int();
    if (!(tag === 0 && n === 0)) {
      if (tag !== NC_DIMENSION) throw new NetcdfError('expected the dimension list');
      for (let i = 0; i < n; i++) {
        const name = r.name();
        const length = r.int();
        if (length === 0)
          throw new NetcdfError(`dimension ${name} is a record dimension, which this reader does not read`);
        dimensions.push({ name, length });
      }
    }
  }
  const attributes = readAttrs(r);
  const variables: NcVariable[] = [];
  const tag = r.int();
  const n = r.int();
  if (!(tag === 0 && n === 0)) {
    if (tag !== NC_VARIABLE) throw new NetcdfError('expected the variable list');
    for (let i = 0; i < n; i++) {
      const name = r.name();
      const rank = r.int();
      const dims: string[] = [];
      for (let k = 0; k < rank; k++) {
        const d = dimensions[r.int()];
        if (d === undefined) throw new NetcdfError(`variable ${name} names an undefined dimension`);
        dims.push(d.name);
      }
      const attrs = readAttrs(r);
      const type = CODE_TYPE.get(r.int());
      if (type === undefined) throw new NetcdfError(`variable ${name} has an unknown type`);
      r.int(); // vsize (recomputed from the shape)
      const begin = r.offset(v2);
      const count = dims.reduce(
        (a, d) => a * (dimensions.find((x) => x.name === d) as NcDimension).length,
        1,
      );
      variables.push({ name, dims, type, attributes: attrs, data: readValues(r.view, begin, type, count) });
    }
  }
  return { dimensions, attributes, variables };
}
