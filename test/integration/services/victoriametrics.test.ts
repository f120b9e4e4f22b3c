// Proof that the dev/CI VictoriaMetrics works from the code: points written with the
// @influxdata/influxdb-client WriteApi to VictoriaMetrics' InfluxDB v2 write endpoint
// (/api/v2/write) are read back through /api/v1/export and /api/v1/query.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InfluxDB, Point } from '@influxdata/influxdb-client';
import { VM_URL, itDatabase, pollUntil, requireService } from '../env.js';

interface ExportLine {
  metric: Record<string, string>;
  values: number[];
  timestamps: number[];
}

const measurements: string[] = [];

async function exportSeries(match: string): Promise<ExportLine[]> {
  const url = new URL('/api/v1/export', VM_URL);
  url.searchParams.set('match[]', match);
  const res = await fetch(url, { signal: AbortSignal.timeout(5_000) });
  if (!res.ok) throw new Error(`export: HTTP ${res.status} ${await res.text()}`);
  const body = await res.text();
  return body
    .split('\n')
    .filter((l) => l.trim() !== '')
    .map((l) => JSON.parse(l) as ExportLine);
}

beforeAll(async () => {
  await requireService('victoriametrics', VM_URL);
});

afterAll(async () => {
  for (const m of measurements) {
    const url = new URL('/api/v1/admin/tsdb/delete_series', VM_URL);
    url.searchParams.set('match[]', `{__name__=~"${m}_.*"}`);
    await fetch(url, { method: 'POST', signal: AbortSignal.timeout(5_000) }).catch(() => undefined);
  }
});

describe('VictoriaMetrics (real server) via @influxdata/influxdb-client', () => {
  it('stores 1000 points written through /api/v2/write and returns them through export and query', async () => {
    const measurement = itDatabase();
    measurements.push(measurement);
    const count = 1_000;
    // 1 s apart, ending one minute ago (inside the default query look-back, never in the future).
    const t0Ms = (Math.floor(Date.now() / 1000) - count - 60) * 1000;
    let written = 0;
    const failures: string[] = [];
    // org, bucket and token are arbitrary for VictoriaMetrics; completions are counted through the
    // callbacks because close()/flush() can resolve before batches already sent are acknowledged.
    const writeApi = new InfluxDB({ url: VM_URL, token: 'reefd-dev', timeout: 10_000 }).getWriteApi(
      'reefd',
      'reefd_it',
      'ms',
      {
        batchSize: 200,
        flushInterval: 50,
        maxRetries: 2,
        writeSuccess: (lines) => {
          written += lines.length;
        },
        writeFailed: (error, lines, attempt) => {
          failures.push(`${lines.length} lines, attempt ${attempt}: ${error.message}`);
        },
      },
    );
    for (let i = 0; i < count; i++) {
      writeApi.writePoint(
        new Point(measurement)
          .tag('site', 'demo-reef')
          .tag('station', i % 2 === 0 ? 'crest' : 'back')
          .floatField('temp_c', 26 + i / 1000)
          .intField('seq', i)
          .timestamp(new Date(t0Ms + i * 1000)),
      );
    }
    await writeApi.flush();
    await pollUntil('writeSuccess for every line', async () => (written >= count ? true : undefined), 15_000);
    await writeApi.close();
    expect(failures).toEqual([]);
    expect(written).toBe(count);

    // Data becomes searchable after VictoriaMetrics flushes its in-memory buffers (about a second).
    const series = await pollUntil(
      'the written points in /api/v1/export',
      async () => {
        await fetch(new URL('/internal/force_flush', VM_URL), { signal: AbortSignal.timeout(5_000) });
        const lines = await exportSeries(`{__name__=~"${measurement}_.*"}`);
        const n = lines.reduce((s, l) => s + l.values.length, 0);
        return n >= 2 * count ? lines : undefined;
      },
      20_000,
      250,
    );
    // Line protocol measurement m with field f becomes the metric m_f; tags become labels.
    const crest = series.find(
      (l) => l.metric.__name__ === `${measurement}_temp_c` && l.metric.station === 'crest',
    );
    expect(crest?.metric.site).toBe('demo-reef');
    expect(crest?.values).toHaveLength(count / 2);
    expect(crest?.timestamps[0]).toBe(t0Ms);
    expect(crest?.values[0]).toBe(26);
    expect(crest?.values[10]).toBeCloseTo(26.02, 12); // i = 20
    const seqBack = series.find(
      (l) => l.metric.__name__ === `${measurement}_seq` && l.metric.station === 'back',
    );
    expect(seqBack?.values.slice(0, 3)).toEqual([1, 3, 5]);
    expect(seqBack?.timestamps[0]).toBe(t0Ms + 1000);

    const query = new URL('/api/v1/query', VM_URL);
    query.searchParams.set('query', `sum(count_over_time(${measurement}_seq[2h]))`);
    const res = await fetch(query, { signal: AbortSignal.timeout(5_000) });
    const body = (await res.json()) as { status: string; data: { result: { value: [number, string] }[] } };
    expect(body.status).toBe('success');
    expect(Number(body.data.result[0]?.value[1])).toBe(count);
  }, 60_000);
});
