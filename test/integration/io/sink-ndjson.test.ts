// The NDJSON sink (replay output) through the shared sink contract, plus the stream (stdout) form.
import { describe, it, expect } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { createNdjsonSink } from '../../../services/sinks/ndjson-sink.js';
import { runSinkContract, readBackItem, contractRecords, type ContractContext } from '../sink-contract.js';

const root = mkdtempSync(join(tmpdir(), 'reefd-ndjson-'));
const pathOf = (ctx: ContractContext): string => join(root, `${ctx.id}.ndjson`);

runSinkContract(
  'ndjson file',
  (ctx) => createNdjsonSink({ path: pathOf(ctx) }),
  async (ctx) => {
    const text = await readFile(pathOf(ctx), 'utf8').catch(() => '');
    return text
      .split('\n')
      .filter((l) => l !== '')
      .map((l) => {
        const r = JSON.parse(l) as { station: string; t: string; o2_umol_kg: number; o2_sat_pct: number };
        return readBackItem(r.station, Date.parse(r.t), r.o2_umol_kg, r.o2_sat_pct);
      });
  },
  { semantics: 'log', cleanup: (ctx) => rm(pathOf(ctx), { force: true }) },
);

describe('ndjson sink on a stream', () => {
  it('writes one record per line in arrival order and flush waits for the stream', async () => {
    const out = new PassThrough({ highWaterMark: 64 });
    const chunks: Buffer[] = [];
    out.on('data', (c: Buffer) => chunks.push(c));
    const sink = await createNdjsonSink({ stream: out });
    const recs = contractRecords('s', 0, 30);
    sink.write(recs.slice(0, 10));
    sink.write(recs.slice(10));
    await sink.flush();
    const lines = Buffer.concat(chunks).toString().trim().split('\n');
    expect(lines.length).toBe(30);
    expect(lines.map((l) => (JSON.parse(l) as { t: string }).t)).toEqual(recs.map((r) => r.t));
    expect(JSON.parse(lines[0] ?? '')).toEqual(recs[0]);
    expect(sink.stats()).toMatchObject({ written: 30, pending: 0 });
    await sink.close();
  });
});
