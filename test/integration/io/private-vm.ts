// A VictoriaMetrics of the test's own, started with -dedup.minScrapeInterval=1ms: the setting a deployment
// needs for "same series and timestamp overwrite" (without it VictoriaMetrics keeps every copy; measured on
// 1.79: two writes of one point export as two samples). The shared dev instance runs without it.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { createServer, type AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pollUntil } from '../env.js';

export interface PrivateVm {
  url: string;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

export async function startPrivateVm(): Promise<PrivateVm> {
  const dir = mkdtempSync(join(tmpdir(), 'reefd-vm-'));
  const port = await freePort();
  const child: ChildProcess = spawn(
    'victoria-metrics',
    [
      `-httpListenAddr=127.0.0.1:${port}`,
      `-storageDataPath=${join(dir, 'data')}`,
      '-retentionPeriod=100y',
      '-search.latencyOffset=0s',
      '-search.disableCache',
      '-dedup.minScrapeInterval=1ms',
      '-memory.allowedBytes=256MiB',
      '-loggerLevel=ERROR',
    ],
    { stdio: 'ignore' },
  );
  const url = `http://127.0.0.1:${port}`;
  await pollUntil(
    'private VictoriaMetrics /health',
    async () => ((await fetch(`${url}/health`).then((r) => r.text())) === 'OK' ? true : undefined),
    20_000,
    100,
  );
  return {
    url,
    stop: async () => {
      const exited = new Promise<void>((r) => child.once('exit', () => r()));
      child.kill('SIGTERM');
      await exited;
      await rm(dir, { recursive: true, force: true });
    },
  };
}
