// Crash test of the disk spool: a child process spools records for an unreachable database and is killed
// with SIGKILL. A new sink on the same spool folder delivers every record whose flush() had resolved,
// in order, once the database is reachable.
import { describe, it, expect } from 'vitest';
import { spawn } from 'node:child_process';
import { createServer, type AddressInfo } from 'node:net';
import { createServer as createHttpServer } from 'node:http';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gunzipSync } from 'node:zlib';
import { createInfluxSink } from '../../../services/sinks/influx-sink.js';
import { pollUntil } from '../env.js';
import { indexOf, quietLogger } from './fixtures.js';

const child = fileURLToPath(new URL('./spool-crash-child.ts', import.meta.url));

async function closedPort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

describe('sink spool under kill -9', () => {
  it('delivers every flushed record after a crash, in order', async () => {
    const spoolDir = await mkdtemp(join(tmpdir(), 'reefd-spool-crash-'));
    const port = await closedPort();
    const proc = spawn(process.execPath, ['--import', 'tsx', child, spoolDir, String(port)], {
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    let flushed = 0;
    let buf = '';
    await new Promise<void>((resolve, reject) => {
      proc.on('error', reject);
      proc.stdout.on('data', (c: Buffer) => {
        buf += c.toString();
        const parts = buf.split('\n');
        buf = parts.pop() ?? '';
        for (const p of parts) flushed = Math.max(flushed, Number(p));
        if (flushed >= 2000) {
          proc.kill('SIGKILL');
          resolve();
        }
      });
    });
    await new Promise((r) => proc.once('exit', r));

    const lines: string[] = [];
    const db = createHttpServer((req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c));
      req.on('end', () => {
        let body = Buffer.concat(chunks);
        if (req.headers['content-encoding'] === 'gzip') body = gunzipSync(body);
        lines.push(
          ...body
            .toString()
            .split('\n')
            .filter((l) => l !== ''),
        );
        res.writeHead(204).end();
      });
    });
    await new Promise<void>((r) => db.listen(0, '127.0.0.1', r));
    const sink = await createInfluxSink({
      url: `http://127.0.0.1:${(db.address() as AddressInfo).port}`,
      api: 'v1',
      batchSize: 200,
      flushMs: 10,
      spoolDir,
      spoolMaxMb: 64,
      logger: quietLogger(),
    });
    await pollUntil(
      `${flushed} spooled records delivered`,
      async () => (lines.length >= flushed ? true : undefined),
      30_000,
      50,
    );
    await sink.close();
    const idx = lines.map((l) => indexOf(Number(/o2_umol_kg=([0-9.e+-]+)/.exec(l)?.[1])));
    // Everything flushed, in order; records spooled after the last reported flush may follow.
    expect(idx.slice(0, flushed)).toEqual(Array.from({ length: flushed }, (_, i) => i));
    expect(idx).toEqual(Array.from({ length: idx.length }, (_, i) => i));
    await new Promise<void>((r) => db.close(() => r()));
    await rm(spoolDir, { recursive: true, force: true });
  });
});
