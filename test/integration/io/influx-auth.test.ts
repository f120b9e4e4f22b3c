// What the database sink sends on the wire (local HTTP server): endpoint, query, credentials, gzip; and
// that no credential reaches a log line even when every request fails.
import { describe, it, expect } from 'vitest';
import { createServer, type IncomingMessage } from 'node:http';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import type { AddressInfo } from 'node:net';
import pino from 'pino';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { oxygenRecords, quietLogger } from './fixtures.js';

interface Seen {
  url: string;
  headers: IncomingMessage['headers'];
}

async function server(status: number): Promise<{ port: number; seen: Seen[]; close: () => Promise<void> }> {
  const seen: Seen[] = [];
  const s = createServer((req, res) => {
    req.resume();
    req.on('end', () => {
      seen.push({ url: req.url ?? '', headers: req.headers });
      res.writeHead(status).end(status === 204 ? undefined : 'nope');
    });
  });
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  return {
    port: (s.address() as AddressInfo).port,
    seen,
    close: () => new Promise<void>((r) => s.close(() => r())),
  };
}

describe('database sink on the wire', () => {
  it('v2: POST /api/v2/write?org&bucket&precision=ms with a Token header, gzip over 1 kB', async () => {
    const srv = await server(204);
    const dir = await mkdtemp(join(tmpdir(), 'reefd-auth-'));
    const sink = await createInfluxSink({
      url: `http://127.0.0.1:${srv.port}/prefix`,
      api: 'v2',
      org: 'reef org',
      bucket: 'b1',
      token: 'tok-secret-1',
      batchSize: 100,
      flushMs: 10,
      spoolDir: dir,
      spoolMaxMb: 1,
      logger: quietLogger(),
    });
    sink.write(oxygenRecords(50, { site: 'wire' }));
    await sink.close();
    expect(srv.seen.length).toBe(1);
    const u = new URL(srv.seen[0]?.url ?? '', 'http://x');
    expect(u.pathname).toBe('/prefix/api/v2/write');
    expect(Object.fromEntries(u.searchParams)).toEqual({ org: 'reef org', bucket: 'b1', precision: 'ms' });
    expect(srv.seen[0]?.headers.authorization).toBe('Token tok-secret-1');
    expect(srv.seen[0]?.headers['content-encoding']).toBe('gzip');
    await srv.close();
    await rm(dir, { recursive: true, force: true });
  });

  it('v1: POST /write?db&precision=ms with Basic credentials; no secret in any log line', async () => {
    const srv = await server(503);
    const dir = await mkdtemp(join(tmpdir(), 'reefd-auth-'));
    const logText: string[] = [];
    const logger = pino(
      { level: 'trace' },
      new Writable({
        write(chunk: Buffer, _enc, cb) {
          logText.push(chunk.toString());
          cb();
        },
      }),
    );
    const sink = await createInfluxSink({
      url: `http://127.0.0.1:${srv.port}`,
      api: 'v1',
      db: 'reef',
      username: 'writer',
      password: 'pw-secret-2',
      batchSize: 10,
      flushMs: 10,
      spoolDir: dir,
      spoolMaxMb: 1,
      logger,
      gzip: false,
      backoff: { baseMs: 5, maxMs: 10 },
      closeDrainMs: 200,
    });
    sink.write(oxygenRecords(10, { site: 'wire' }));
    await sink.close();
    expect(srv.seen.length).toBeGreaterThan(1); // failed, spooled, retried
    const u = new URL(srv.seen[0]?.url ?? '', 'http://x');
    expect(u.pathname).toBe('/write');
    expect(Object.fromEntries(u.searchParams)).toEqual({ db: 'reef', precision: 'ms' });
    expect(srv.seen[0]?.headers.authorization).toBe(
      `Basic ${Buffer.from('writer:pw-secret-2').toString('base64')}`,
    );
    expect(srv.seen[0]?.headers['content-encoding']).toBeUndefined();
    const all = logText.join('');
    expect(all).toContain('destination unreachable');
    expect(all).not.toContain('pw-secret-2');
    expect(all).not.toContain(Buffer.from('writer:pw-secret-2').toString('base64'));
    await srv.close();
    await rm(dir, { recursive: true, force: true });
  });
});
