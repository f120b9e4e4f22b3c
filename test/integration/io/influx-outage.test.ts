// The database sink through an outage: a local HTTP server we control answers 503, then refuses
// connections, then accepts. Everything written arrives exactly once, in order, and the spool empties.
import { describe, it, expect, afterEach } from 'vitest';
import { createServer, type Server } from 'node:http';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import type { AddressInfo } from 'node:net';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { indexOf, oxygenRecords, quietLogger } from './fixtures.js';
import { pollUntil } from '../env.js';

type Mode = 'ok' | 'unavailable';

interface Db {
  server: Server;
  port: number;
  lines: string[];
  mode: Mode;
  requests: number;
}

async function startDb(port = 0): Promise<Db> {
  const db: Db = { server: undefined as unknown as Server, port, lines: [], mode: 'ok', requests: 0 };
  db.server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      db.requests++;
      if (db.mode === 'unavailable') {
        res.writeHead(503).end('busy');
        return;
      }
      let body = Buffer.concat(chunks);
      if (req.headers['content-encoding'] === 'gzip') body = gunzipSync(body);
      db.lines.push(
        ...body
          .toString('utf8')
          .split('\n')
          .filter((l) => l !== ''),
      );
      res.writeHead(204).end();
    });
  });
  await new Promise<void>((r) => db.server.listen(port, '127.0.0.1', r));
  db.port = (db.server.address() as AddressInfo).port;
  return db;
}

function stopDb(db: Db): Promise<void> {
  db.server.closeAllConnections();
  return new Promise((r) => db.server.close(() => r()));
}

/** The record index carried by a line's o2_umol_kg field. */
function lineIndex(line: string): number {
  const m = /o2_umol_kg=([0-9.e+-]+)/.exec(line);
  return indexOf(Number(m?.[1]));
}

const dirs: string[] = [];
afterEach(async () => {
  for (const d of dirs.splice(0)) await rm(d, { recursive: true, force: true });
});

describe('time-series sink through an outage (local HTTP server)', () => {
  it('spools while the database answers 503 or refuses, then delivers everything once, in order', async () => {
    const spoolDir = await mkdtemp(join(tmpdir(), 'reefd-outage-'));
    dirs.push(spoolDir);
    let db = await startDb();
    const port = db.port;
    db.mode = 'unavailable';
    const sink = await createInfluxSink({
      url: `http://127.0.0.1:${port}`,
      api: 'v1',
      db: 'reefd',
      batchSize: 50,
      flushMs: 20,
      spoolDir,
      spoolMaxMb: 16,
      logger: quietLogger(),
      maxMemoryLines: 100,
      backoff: { baseMs: 20, maxMs: 100 },
    });
    const N = 1000;
    const recs = oxygenRecords(N, { site: 'outage-reef' });
    for (let i = 0; i < 400; i += 40) sink.write(recs.slice(i, i + 40));
    await sink.flush();
    // Everything so far is on disk, nothing reached the database.
    expect(db.lines.length).toBe(0);
    expect(sink.stats().spoolBytes).toBeGreaterThan(0);
    expect(sink.stats().pending).toBe(400);

    // Now the database goes away entirely: connections are refused.
    await stopDb(db);
    for (let i = 400; i < 700; i += 30) sink.write(recs.slice(i, i + 30));
    await sink.flush();
    expect(sink.stats().pending).toBe(700);

    // Back, accepting: the rest is written while the spool drains.
    db = await startDb(port);
    for (let i = 700; i < N; i += 25) sink.write(recs.slice(i, i + 25));
    await pollUntil(
      'all 1000 lines at the database',
      async () => (db.lines.length >= N ? true : undefined),
      30_000,
      20,
    );
    await sink.flush();
    await sink.close();
    expect(db.lines.length).toBe(N);
    expect(db.lines.map(lineIndex)).toEqual(Array.from({ length: N }, (_, i) => i));
    expect(sink.stats()).toMatchObject({ written: N, failed: 0, pending: 0, spoolBytes: 0 });
    await stopDb(db);
  });

  it('keeps the spool across close and reopen while the database is down', async () => {
    const spoolDir = await mkdtemp(join(tmpdir(), 'reefd-outage-'));
    dirs.push(spoolDir);
    const db = await startDb();
    db.mode = 'unavailable';
    const opts = {
      url: `http://127.0.0.1:${db.port}`,
      api: 'v2' as const,
      batchSize: 20,
      flushMs: 10,
      spoolDir,
      spoolMaxMb: 16,
      logger: quietLogger(),
      backoff: { baseMs: 10, maxMs: 50 },
      closeDrainMs: 100,
    };
    const a = await createInfluxSink(opts);
    a.write(oxygenRecords(100, { site: 'reopen-reef' }));
    await a.close();
    expect(db.lines.length).toBe(0);
    db.mode = 'ok';
    const b = await createInfluxSink(opts);
    b.write(oxygenRecords(10, { site: 'reopen-reef', fromIndex: 100 }));
    await pollUntil('110 lines', async () => (db.lines.length >= 110 ? true : undefined), 20_000, 20);
    await b.close();
    expect(db.lines.map(lineIndex)).toEqual(Array.from({ length: 110 }, (_, i) => i));
    await stopDb(db);
  });

  it('drops a batch the database refuses (400) and goes on with the next', async () => {
    const spoolDir = await mkdtemp(join(tmpdir(), 'reefd-outage-'));
    dirs.push(spoolDir);
    const db = await startDb();
    let refuse = true;
    db.server.removeAllListeners('request');
    db.server.on('request', (req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c));
      req.on('end', () => {
        if (refuse) {
          refuse = false;
          res.writeHead(400).end('{"error":"field type conflict"}');
          return;
        }
        db.lines.push(
          ...Buffer.concat(chunks)
            .toString()
            .split('\n')
            .filter((l) => l !== ''),
        );
        res.writeHead(204).end();
      });
    });
    const sink = await createInfluxSink({
      url: `http://127.0.0.1:${db.port}`,
      api: 'v1',
      batchSize: 10,
      flushMs: 10,
      spoolDir,
      spoolMaxMb: 1,
      logger: quietLogger(),
      gzip: false,
    });
    sink.write(oxygenRecords(20, { site: 'refuse-reef' }));
    await sink.flush();
    await sink.close();
    expect(db.lines.map(lineIndex)).toEqual(Array.from({ length: 10 }, (_, i) => 10 + i));
    expect(sink.stats()).toMatchObject({ written: 10, failed: 10 });
    expect(sink.stats().lastError).toContain('HTTP 400');
    await stopDb(db);
  });

  it('raises the near-limit signal at 80 % of spool_max_mb and refuses the newest beyond the bound', async () => {
    const spoolDir = await mkdtemp(join(tmpdir(), 'reefd-outage-'));
    dirs.push(spoolDir);
    const db = await startDb();
    db.mode = 'unavailable';
    const signals: number[] = [];
    const sink = await createInfluxSink({
      url: `http://127.0.0.1:${db.port}`,
      api: 'v1',
      batchSize: 10,
      flushMs: 10,
      spoolDir,
      spoolMaxMb: 10 / 1024, // 10 KiB
      logger: quietLogger(),
      backoff: { baseMs: 10, maxMs: 20 },
      onNearLimit: (s) => signals.push(s.spoolBytes / s.maxBytes),
    });
    const recs = oxygenRecords(300, { site: 'full-reef' });
    for (let i = 0; i < 300; i += 10) {
      sink.write(recs.slice(i, i + 10));
      await sink.flush();
    }
    expect(signals.length).toBe(1);
    expect(signals[0]).toBeGreaterThanOrEqual(0.8);
    expect(sink.nearLimit()).toBe(true);
    const st = sink.stats();
    expect(st.spoolBytes).toBeLessThanOrEqual(10 * 1024);
    expect(st.failed).toBeGreaterThan(0);
    expect(st.failed + st.pending).toBe(300);
    // The oldest are kept: once the database is back, it receives an unbroken prefix 0..k-1.
    db.mode = 'ok';
    const kept = st.pending;
    await pollUntil('spool drained', async () => (db.lines.length >= kept ? true : undefined), 20_000, 20);
    await sink.close();
    expect(db.lines.map(lineIndex)).toEqual(Array.from({ length: kept }, (_, i) => i));
    await stopDb(db);
  });
});
