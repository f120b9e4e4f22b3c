// The shore member's /healthz and /metrics, read from the member's statistics at each request.
import { afterEach, describe, expect, it } from 'vitest';
import type { ShoreStats } from './shore.js';
import { startShoreHttp, type ShoreHttp, type ShorePhase } from './shore-http.js';

const stats: ShoreStats = {
  messages: 120,
  skipped: 7,
  rejected: 3,
  unknownSite: 2,
  duplicates: 4,
  records: 55,
  restores: 1,
  snapshots: 6,
};
// Member state as the member reports it: partitions 0 and 2 assigned, partition 2 stored 15 messages back,
// partition 5 (met before a rebalance) never stored.
const member = {
  stats: () => ({ ...stats }),
  assigned: () => [0, 2],
  positions: () =>
    new Map([
      [0, 40n],
      [2, 115n],
      [5, 9n],
    ]),
  storedAt: () =>
    new Map([
      [0, 40n],
      [2, 100n],
    ]),
};

let http: ShoreHttp | undefined;
afterEach(async () => {
  await http?.close();
  http = undefined;
});

async function get(path: string): Promise<{ status: number; body: string }> {
  const res = await fetch(`http://${http?.address}${path}`);
  return { status: res.status, body: await res.text() };
}

describe('shore member HTTP', () => {
  it('binds 127.0.0.1 by default and answers /healthz by the member phase', async () => {
    let phase: ShorePhase = 'starting';
    http = await startShoreHttp({ member, phase: () => phase, port: 0, withDefaults: false });
    expect(http.address).toMatch(/^127\.0\.0\.1:\d+$/);
    expect(await get('/healthz')).toEqual({ status: 503, body: 'starting\n' });
    phase = 'running';
    expect(await get('/healthz')).toEqual({ status: 200, body: 'ok\n' });
    phase = 'stopping';
    expect(await get('/healthz')).toEqual({ status: 503, body: 'stopping\n' });
    expect((await get('/nowhere')).status).toBe(404);
  });

  it('serves the counters and gauges read from the member at each scrape', async () => {
    http = await startShoreHttp({
      member,
      phase: () => 'running',
      port: 0,
      withDefaults: false,
      build: { version: '9.9.9', node: 'v20.0.0' },
    });
    const first = await get('/metrics');
    expect(first.status).toBe(200);
    const m = first.body;
    expect(m).toContain('reefd_build_info{version="9.9.9",node="v20.0.0"} 1');
    expect(m).toContain('reefd_shore_messages_total{outcome="processed"} 117');
    expect(m).toContain('reefd_shore_messages_total{outcome="skipped"} 7');
    expect(m).toContain('reefd_shore_messages_total{outcome="rejected"} 3');
    expect(m).toContain('reefd_shore_messages_total{outcome="unknown_site"} 2');
    expect(m).toContain('reefd_shore_duplicates_total 4');
    expect(m).toContain('reefd_shore_records_total 55');
    expect(m).toContain('reefd_shore_restores_total 1');
    expect(m).toContain('reefd_shore_snapshots_total 6');
    expect(m).toContain('reefd_shore_partitions_assigned 2');
    expect(m).toContain('reefd_shore_unstored_messages{partition="0"} 0');
    expect(m).toContain('reefd_shore_unstored_messages{partition="2"} 15');
    expect(m).not.toContain('partition="5"');
    // Read again at the next scrape, not accumulated.
    stats.records = 60;
    const second = (await get('/metrics')).body;
    expect(second).toContain('reefd_shore_records_total 60');
    expect(second).toContain('reefd_shore_messages_total{outcome="processed"} 117');
  });
});
