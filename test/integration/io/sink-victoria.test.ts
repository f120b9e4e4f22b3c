// The database sink in v2 mode against VictoriaMetrics' /api/v2/write: the shared sink contract (on an
// instance with deduplication on, as a deployment must run it), and hostile ids round-tripped through the
// shared dev instance.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { VM_URL, randomSuffix, requireService, pollUntil } from '../env.js';
import { runSinkContract, readBackItem } from '../sink-contract.js';
import { vmExport } from './influx-http.js';
import { startPrivateVm, type PrivateVm } from './private-vm.js';
import { quietLogger } from './fixtures.js';

const root = mkdtempSync(join(tmpdir(), 'reefd-vm-sink-'));
let vm: PrivateVm;

beforeAll(async () => {
  await requireService('VictoriaMetrics', VM_URL);
  vm = await startPrivateVm();
});
afterAll(async () => {
  await vm?.stop();
  await rm(root, { recursive: true, force: true });
});

runSinkContract(
  'VictoriaMetrics (/api/v2/write, dedup on)',
  async (ctx) =>
    createInfluxSink({
      url: vm.url,
      api: 'v2',
      org: 'reefd',
      bucket: 'reefd',
      batchSize: 64,
      flushMs: 50,
      spoolDir: join(root, ctx.id),
      spoolMaxMb: 16,
      logger: quietLogger(),
    }),
  async (ctx) => {
    const o2 = await vmExport(vm.url, `{__name__="oxygen_o2_umol_kg",site="${ctx.site}"}`);
    const sat = await vmExport(vm.url, `{__name__="oxygen_o2_sat_pct",site="${ctx.site}"}`);
    const satAt = new Map<string, number>();
    for (const s of sat)
      s.timestamps.forEach((t, i) => satAt.set(`${s.metric.station}|${t}`, s.values[i] as number));
    const out = [];
    for (const s of o2) {
      const station = s.metric.station ?? '';
      for (let i = 0; i < s.timestamps.length; i++) {
        const t = s.timestamps[i] as number;
        out.push(readBackItem(station, t, s.values[i] as number, satAt.get(`${station}|${t}`) ?? NaN));
      }
    }
    return out;
  },
  { semantics: 'dedup' },
);

describe('line protocol against VictoriaMetrics (shared dev instance)', () => {
  it('round-trips hostile tag values (v2 dialect: backslash kept, newline -> space)', async () => {
    const site = `it_${randomSuffix()}`;
    const sink = await createInfluxSink({
      url: VM_URL,
      api: 'v2',
      batchSize: 10,
      flushMs: 10,
      spoolDir: join(root, site),
      spoolMaxMb: 1,
      logger: quietLogger(),
    });
    const hostile = {
      type: 'oxygen',
      site,
      station: 'a b,c=d"e\\f\ng\\',
      t: '2026-11-20T00:00:00.000Z',
      o2_umol_kg: 201.5,
      o2_sat_pct: null,
      o2_mg_l: null,
    } as DerivedRecord;
    sink.write([hostile]);
    await sink.flush();
    await sink.close();
    expect(sink.stats()).toMatchObject({ written: 1, failed: 0 });
    const got = await pollUntil(
      'the hostile point',
      async () => {
        const s = await vmExport(VM_URL, `{__name__="oxygen_o2_umol_kg",site="${site}"}`);
        return s.length > 0 ? s : undefined;
      },
      10_000,
    );
    expect(got.length).toBe(1);
    expect(got[0]?.metric.station).toBe('a b,c=d"e\\f g\\');
    expect(got[0]?.values).toEqual([201.5]);
    expect(got[0]?.timestamps).toEqual([Date.UTC(2026, 10, 20)]);
  });
});
