// CSV export: one file per record type (`<type>.csv`), one row per record (the latest revision), a header
// of field names (units are in the names, docs/contract-v1.md), and `columns.csv` giving each column's
// unit, description and CF standard name from the record-type table. RFC 4180 quoting; empty = missing.
import { createWriteStream, type WriteStream } from 'node:fs';
import path from 'node:path';
import {
  RECORD_TYPE_SPECS,
  fieldSpec,
  type DerivedRecord,
  type RecordType,
} from '../../libs/contract/index.js';
import { eachWinner, type ScanResult } from './scan.js';

export function csvCell(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  const s = typeof v === 'string' ? v : typeof v === 'boolean' ? String(v) : JSON.stringify(v);
  return /[",\n\r]/.test(s) || s !== s.trim() ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Column order: time and place first, then the table's fields, then any other field seen, sorted. */
export function csvColumns(type: RecordType, seen: ReadonlySet<string>): string[] {
  const spec = RECORD_TYPE_SPECS[type];
  const head = ['t', 'site', spec.subject === 'transect' ? 'transect' : 'station', 'sensor'];
  const table = Object.keys(spec.fields);
  const cols = [...head.filter((c) => c !== 'sensor' || seen.has('sensor') || table.includes('sensor'))];
  for (const f of table) if (!cols.includes(f)) cols.push(f);
  const rest = [...seen].filter((k) => !cols.includes(k) && k !== 'type').sort();
  return [...cols, ...rest];
}

class Sink {
  #parts: string[] = [];
  #size = 0;
  constructor(readonly stream: WriteStream) {}
  async write(s: string): Promise<void> {
    this.#parts.push(s);
    this.#size += s.length;
    if (this.#size > 1 << 16) await this.flush();
  }
  async flush(): Promise<void> {
    if (this.#size === 0) return;
    const chunk = this.#parts.join('');
    this.#parts = [];
    this.#size = 0;
    if (!this.stream.write(chunk)) await new Promise<void>((r) => this.stream.once('drain', () => r()));
  }
  async close(): Promise<void> {
    await this.flush();
    await new Promise<void>((resolve, reject) =>
      this.stream.end((err?: Error | null) => (err ? reject(err) : resolve())),
    );
  }
}

export async function exportCsv(
  recordsFile: string,
  scan: ScanResult,
  outDir: string,
): Promise<{ files: string[]; rows: Record<string, number> }> {
  const sinks = new Map<RecordType, { sink: Sink; cols: string[] }>();
  const rows: Record<string, number> = {};
  const files: string[] = [];
  const open = async (type: RecordType) => {
    let s = sinks.get(type);
    if (s === undefined) {
      const file = path.join(outDir, `${type}.csv`);
      files.push(file);
      const cols = csvColumns(type, scan.columns.get(type) ?? new Set());
      s = { sink: new Sink(createWriteStream(file)), cols };
      await s.sink.write(`${cols.join(',')}\n`);
      sinks.set(type, s);
    }
    return s;
  };
  for await (const r of eachWinner(recordsFile, scan)) {
    const s = await open(r.type);
    const rec = r as DerivedRecord & Record<string, unknown>;
    await s.sink.write(`${s.cols.map((c) => csvCell(rec[c])).join(',')}\n`);
    rows[r.type] = (rows[r.type] ?? 0) + 1;
  }
  for (const s of sinks.values()) await s.sink.close();
  // The data dictionary of what was written.
  const dict = ['type,column,unit,description,standard_name'];
  for (const [type, s] of sinks) {
    for (const c of s.cols) {
      const f = fieldSpec(type, c);
      const unit = c === 't' ? 'ISO 8601 UTC' : (f?.unit ?? '');
      dict.push([type, c, unit, f?.label ?? '', f?.standardName ?? ''].map(csvCell).join(','));
    }
  }
  const dictFile = path.join(outDir, 'columns.csv');
  const ds = new Sink(createWriteStream(dictFile));
  await ds.write(`${dict.join('\n')}\n`);
  await ds.close();
  files.push(dictFile);
  return { files, rows };
}
