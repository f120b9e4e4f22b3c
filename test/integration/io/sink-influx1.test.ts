// The database sink in v1 mode against the real InfluxDB 1.x: the shared sink contract, and hostile ids
// round-tripped through line-protocol escaping.
import { describe, it, expect, beforeAll } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { INFLUX1_URL, itDatabase, requireService } from '../env.js';
import { runSinkContract, readBackItem, type ContractContext } from '../sink-contract.js';
import { influxQuery, rows } from './influx-http.js';
import { quietLogger } from './fixtures.js';

const root = mkdtempSync(join(tmpdir(), 'reefd-influx1-'));
const dbOf = (ctx: ContractContext): string => `reefd_it_${ctx.id}`;

beforeAll(async () => {
  await requireService('InfluxDB 1.x', INFLUX1_URL);
});

runSinkContract(
  'InfluxDB 1.x (/write)',
  async (ctx) => {
    await influxQuery(INFLUX1_URL, undefined, `CREATE DATABASE ${dbOf(ctx)}`);
    return createInfluxSink({
      url: INFLUX1_URL,
      api: 'v1',
      db: dbOf(ctx),
      batchSize: 64,
      flushMs: 50,
      spoolDir: join(root, ctx.id),
      spoolMaxMb: 16,
      logger: quietLogger(),
    });
  },
  async (ctx) => {
    const s = await influxQuery(
      INFLUX1_URL,
      dbOf(ctx),
      `SELECT o2_umol_kg, o2_sat_pct, station FROM oxygen WHERE site = '${ctx.site}'`,
    );
    return rows(s).map((r) =>
      readBackItem(String(r.station), Number(r.time), Number(r.o2_umol_kg), Number(r.o2_sat_pct)),
    );
  },
  {
    semantics: 'upsert',
    cleanup: async (ctx) => {
      await influxQuery(INFLUX1_URL, undefined, `DROP DATABASE ${dbOf(ctx)}`);
      await rm(join(root, ctx.id), { recursive: true, force: true });
    },
  },
);

describe('line protocol against InfluxDB 1.x', () => {
  it('round-trips hostile tag values and string fields (v1 dialect: backslash -> /, newline -> space)', async () => {
    const db = itDatabase();
    await influxQuery(INFLUX1_URL, undefined, `CREATE DATABASE ${db}`);
    const sink = await createInfluxSink({
      url: INFLUX1_URL,
      api: 'v1',
      db,
      batchSize: 10,
      flushMs: 10,
      spoolDir: join(root, db),
      spoolMaxMb: 1,
      logger: quietLogger(),
    });
    const hostile = {
      type: 'current',
      site: 'a b,c=d"e\\f',
      station: 'st\nx=1 y',
      t: '2026-11-20T00:00:00.000Z',
      east_m_s: 0.1,
      north_m_s: -0.2,
      u_m_s: null,
      v_m_s: null,
      speed_m_s: 0.2236,
      dir_to_deg: 153.4,
      bins_used: 12,
      sensor: 'adcp "1", \\o/\n=,',
    } as DerivedRecord;
    sink.write([hostile]);
    await sink.flush();
    await sink.close();
    expect(sink.stats()).toMatchObject({ written: 1, failed: 0 });
    const r = rows(await influxQuery(INFLUX1_URL, db, 'SELECT * FROM "current"'));
    expect(r.length).toBe(1);
    expect(r[0]).toMatchObject({
      site: 'a b,c=d"e/f',
      station: 'st x=1 y',
      sensor: 'adcp "1", /o/ =,', // a tag now: escaped like the other tags
      east_m_s: 0.1,
      bins_used: 12,
      time: Date.UTC(2026, 10, 20),
    });
    await influxQuery(INFLUX1_URL, undefined, `DROP DATABASE ${db}`);
  });
});
