// Reading a derived-records file (NDJSON, from `reefd replay` or `outputs.ndjson`) for export, in two
// streaming passes so memory does not grow with the records' values:
//   pass 1 (scanRecords) learns, per record identity (record-types.ts recordKey), which line wins: the
//     highest `revision`, the last line among equals (outputs deliver at least once, so copies happen);
//     it keeps a 53-bit hash of each identity, not the identity itself, plus the columns seen per type;
//   pass 2 (eachWinner) yields only the winning lines.
// Two identities colliding on 53 bits would drop one record; at a million records the chance is ~1e-4.
import { createReadStream } from 'node:fs';
import { createInterface } from 'node:readline';
import { createGunzip } from 'node:zlib';
import type { Readable } from 'node:stream';
import {
  derivedRecordSchema,
  recordKey,
  type DerivedRecord,
  type RecordType,
} from '../../libs/contract/index.js';

export interface ScanResult {
  lines: number;
  /** Lines that were not a derived record (JSON or schema), with the first few line numbers. */
  invalid: number;
  invalidLines: number[];
  /** Records superseded by a later revision or repeated. */
  superseded: number;
  records: number;
  /** Field names seen per record type (every key of every record). */
  columns: Map<RecordType, Set<string>>;
  /** Winning line number per identity hash. */
  winners: Map<number, { revision: number; line: number }>;
}

/** FNV-1a of a string, two independent 32-bit streams combined into a 53-bit integer. */
export function hash53(s: string): number {
  let h1 = 0x811c9dc5;
  let h2 = 0x01000193 ^ 0x5bd1e995;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    h1 = Math.imul(h1 ^ c, 0x01000193) >>> 0;
    h2 = Math.imul(h2 ^ c, 0x5bd1e995) >>> 0;
    h2 ^= h2 >>> 15;
  }
  return (h2 & 0x1fffff) * 0x100000000 + h1;
}

async function* lines(file: string): AsyncGenerator<{ n: number; text: string }> {
  let input: Readable = createReadStream(file);
  if (file.endsWith('.gz')) input = input.pipe(createGunzip());
  const rl = createInterface({ input, crlfDelay: Infinity });
  let n = 0;
  for await (const text of rl) {
    n++;
    if (text.trim() !== '') yield { n, text };
  }
}

function parse(text: string): DerivedRecord | undefined {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    return undefined;
  }
  const r = derivedRecordSchema.safeParse(raw);
  return r.success && Number.isFinite(Date.parse(r.data.t)) ? r.data : undefined;
}

export async function scanRecords(file: string): Promise<ScanResult> {
  const out: ScanResult = {
    lines: 0,
    invalid: 0,
    invalidLines: [],
    superseded: 0,
    records: 0,
    columns: new Map(),
    winners: new Map(),
  };
  for await (const { n, text } of lines(file)) {
    out.lines = n;
    const r = parse(text);
    if (r === undefined) {
      out.invalid++;
      if (out.invalidLines.length < 5) out.invalidLines.push(n);
      continue;
    }
    let cols = out.columns.get(r.type);
    if (cols === undefined) {
      cols = new Set();
      out.columns.set(r.type, cols);
    }
    for (const k of Object.keys(r)) cols.add(k);
    const h = hash53(recordKey(r));
    const revision = r.revision ?? 0;
    const prev = out.winners.get(h);
    if (prev === undefined) out.records++;
    else out.superseded++;
    if (prev === undefined || revision >= prev.revision) out.winners.set(h, { revision, line: n });
  }
  return out;
}

/** The winning records of a scanned file, in file order. */
export async function* eachWinner(file: string, scan: ScanResult): AsyncGenerator<DerivedRecord> {
  for await (const { n, text } of lines(file)) {
    const r = parse(text);
    if (r === undefined) continue;
    if (scan.winners.get(hash53(recordKey(r)))?.line === n) yield r;
  }
}
