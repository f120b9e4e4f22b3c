// Proof that the dev/CI InfluxDB 1.x works from the code: line protocol POSTed to /write is
// read back with InfluxQL through /query, in a database created and dropped by the test.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { INFLUX1_URL, itDatabase, requireService } from '../env.js';

interface QueryResult {
  results: {
    statement_id: number;
    error?: string;
    series?: { name: string; tags?: Record<string, string>; columns: string[]; values: unknown[][] }[];
  }[];
  error?: string;
}

const databases: string[] = [];

async function influxql(q: string, db?: string): Promise<QueryResult> {
  const url = new URL('/query', INFLUX1_URL);
  url.searchParams.set('epoch', 'ms');
  if (db !== undefined) url.searchParams.set('db', db);
  const res = await fetch(url, {
    method: 'POST',
    body: new URLSearchParams({ q }),
    signal: AbortSignal.timeout(10_000),
  });
  const body = (await res.json()) as QueryResult;
  if (!res.ok || body.error !== undefined || body.results.some((r) => r.error !== undefined)) {
    throw new Error(`InfluxQL "${q}" failed: HTTP ${res.status} ${JSON.stringify(body)}`);
  }
  return body;
}

beforeAll(async () => {
  await requireService('influxdb1', INFLUX1_URL);
});

afterAll(async () => {
  for (const db of databases) await influxql(`DROP DATABASE "${db}"`).catch(() => undefined);
});

describe('InfluxDB 1.x (real server)', () => {
  it('answers /ping with its version', async () => {
    const res = await fetch(new URL('/ping', INFLUX1_URL), { signal: AbortSignal.timeout(5_000) });
    expect(res.status).toBe(204);
    expect(res.headers.get('x-influxdb-version')).toMatch(/^1\./);
  });

  it('stores 2000 line-protocol points from /write and returns them with InfluxQL', async () => {
    const db = itDatabase();
    databases.push(db);
    await influxql(`CREATE DATABASE "${db}"`);
    const count = 2_000;
    const t0Ms = Date.UTC(2026, 5, 1, 0, 0, 0);
    const lines: string[] = [];
    for (let i = 0; i < count; i++) {
      const station = i % 2 === 0 ? 'crest' : 'back';
      // A tag value with a space is escaped as line protocol requires (\ before the space).
      lines.push(
        `ctd,site=demo-reef,station=${station},label=North\\ flat temp_c=${26 + i / 1000},sal=35.1,seq=${i}i ${t0Ms + i * 1000}`,
      );
    }
    const write = new URL('/write', INFLUX1_URL);
    write.searchParams.set('db', db);
    write.searchParams.set('precision', 'ms');
    const res = await fetch(write, {
      method: 'POST',
      body: lines.join('\n'),
      signal: AbortSignal.timeout(10_000),
    });
    expect(res.status, await res.clone().text()).toBe(204);

    const counted = await influxql('SELECT count(temp_c) FROM ctd GROUP BY station', db);
    const byStation = new Map(
      counted.results[0]?.series?.map((s) => [s.tags?.station, s.values[0]?.[1]]) ?? [],
    );
    expect(byStation.get('crest')).toBe(count / 2);
    expect(byStation.get('back')).toBe(count / 2);

    const rows = await influxql(
      `SELECT temp_c, sal, seq, label FROM ctd WHERE station = 'back' ORDER BY time ASC LIMIT 3`,
      db,
    );
    const series = rows.results[0]?.series?.[0];
    expect(series?.columns).toEqual(['time', 'temp_c', 'sal', 'seq', 'label']);
    expect(series?.values).toEqual([
      [t0Ms + 1000, 26.001, 35.1, 1, 'North flat'],
      [t0Ms + 3000, 26.003, 35.1, 3, 'North flat'],
      [t0Ms + 5000, 26.005, 35.1, 5, 'North flat'],
    ]);

    const mean = await influxql(
      `SELECT mean(seq) FROM ctd WHERE time >= ${t0Ms}ms AND time < ${t0Ms + 100_000}ms`,
      db,
    );
    expect(mean.results[0]?.series?.[0]?.values[0]?.[1]).toBe(49.5); // mean of 0..99
  }, 60_000);
});
