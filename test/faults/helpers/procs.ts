// Private services for the fault cases: a Mosquitto with persistence, a VictoriaMetrics that can be stopped
// and started on the same port and data folder, and a TCP proxy that can be cut. Each belongs to one test and
// is stopped by it; the shared dev services are never restarted.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { connect, createServer, type AddressInfo, type Server, type Socket } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pollUntil } from '../../integration/env.js';

export async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

export async function portOpen(port: number): Promise<boolean> {
  return new Promise<boolean>((resolve) => {
    const s = connect(port, '127.0.0.1');
    s.once('connect', () => {
      s.destroy();
      resolve(true);
    });
    s.once('error', () => resolve(false));
  });
}

async function stopChild(child: ChildProcess | undefined, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((r) => child.once('exit', () => r()));
  child.kill(signal);
  await exited;
}

export interface PrivateMosquitto {
  url: string;
  port: number;
  /** SIGTERM (Mosquitto saves its persistence file) and start again on the same port and folder. */
  restart(downMs?: number): Promise<void>;
  stop(): Promise<void>;
}

/** Queue limits as deploy/mosquitto/reefd.conf sets them, persistence on, in a folder of its own. */
export async function startPrivateMosquitto(): Promise<PrivateMosquitto> {
  const dir = mkdtempSync(join(tmpdir(), 'reefd-faults-mosq-'));
  const port = await freePort();
  const conf = [
    'user root',
    'persistence true',
    `persistence_location ${dir}/`,
    'autosave_interval 30',
    'max_queued_messages 2000000',
    'max_queued_bytes 2000000000',
    'max_inflight_messages 1000',
    'allow_anonymous true',
    `listener ${port} 127.0.0.1`,
    '',
  ].join('\n');
  writeFileSync(join(dir, 'mosquitto.conf'), conf);
  let child: ChildProcess | undefined;
  const start = async (): Promise<void> => {
    child = spawn('mosquitto', ['-c', join(dir, 'mosquitto.conf')], { stdio: 'ignore' });
    await pollUntil(
      'private Mosquitto listening',
      async () => ((await portOpen(port)) ? true : undefined),
      10_000,
      50,
    );
  };
  await start();
  return {
    url: `mqtt://127.0.0.1:${port}`,
    port,
    restart: async (downMs = 500) => {
      await stopChild(child);
      await new Promise((r) => setTimeout(r, downMs));
      await start();
    },
    stop: async () => {
      await stopChild(child);
      await rm(dir, { recursive: true, force: true });
    },
  };
}

export interface ControlledVm {
  url: string;
  /** Stops the process (SIGTERM); the port then refuses connections. */
  down(): Promise<void>;
  /** Starts it again on the same port and data folder. */
  up(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * A VictoriaMetrics of the test's own. With `dedup` it runs with -dedup.minScrapeInterval=1ms, the setting
 * a deployment needs for reefd's re-sent points to overwrite (services/sinks/influx-sink.ts); without it
 * every copy of a point written twice stays visible in /api/v1/export.
 */
export async function startControlledVm(o: { dedup?: boolean } = {}): Promise<ControlledVm> {
  const dir = mkdtempSync(join(tmpdir(), 'reefd-faults-vm-'));
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  let child: ChildProcess | undefined;
  const up = async (): Promise<void> => {
    child = spawn(
      'victoria-metrics',
      [
        `-httpListenAddr=127.0.0.1:${port}`,
        `-storageDataPath=${join(dir, 'data')}`,
        '-retentionPeriod=100y',
        '-search.latencyOffset=0s',
        '-search.disableCache',
        '-memory.allowedBytes=128MiB',
        ...(o.dedup === true ? ['-dedup.minScrapeInterval=1ms'] : []),
        '-loggerLevel=ERROR',
      ],
      { stdio: 'ignore' },
    );
    await pollUntil(
      'private VictoriaMetrics /health',
      async () => ((await fetch(`${url}/health`).then((r) => r.text())) === 'OK' ? true : undefined),
      20_000,
      100,
    );
  };
  await up();
  return {
    url,
    up,
    down: () => stopChild(child),
    stop: async () => {
      await stopChild(child);
      await rm(dir, { recursive: true, force: true });
    },
  };
}

export interface TcpProxy {
  port: number;
  /** Destroys every open connection and refuses new ones until restore(). */
  cut(): void;
  restore(): void;
  close(): Promise<void>;
}

export async function startTcpProxy(targetPort: number): Promise<TcpProxy> {
  let open = true;
  const sockets = new Set<Socket>();
  const server: Server = createServer((client) => {
    if (!open) {
      client.destroy();
      return;
    }
    const upstream = connect(targetPort, '127.0.0.1');
    sockets.add(client);
    sockets.add(upstream);
    const drop = (): void => {
      client.destroy();
      upstream.destroy();
      sockets.delete(client);
      sockets.delete(upstream);
    };
    client.on('error', drop).on('close', drop);
    upstream.on('error', drop).on('close', drop);
    client.pipe(upstream);
    upstream.pipe(client);
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const port = (server.address() as AddressInfo).port;
  return {
    port,
    cut: () => {
      open = false;
      for (const s of sockets) s.destroy();
      sockets.clear();
    },
    restore: () => {
      open = true;
    },
    close: async () => {
      open = false;
      for (const s of sockets) s.destroy();
      await new Promise<void>((r) => server.close(() => r()));
    },
  };
}

export interface CountingHttpProxy {
  url: string;
  /** Line-protocol lines POSTed per measurement (every attempt the target accepted). */
  lines: Map<string, number>;
  /** Timestamps (ms, precision=ms) of the accepted lines of `orderOf`, in the order they reached the target. */
  order: number[];
  /** When false, every request is answered 503 without reaching the target. */
  setUp(up: boolean): void;
  /** Holds every request this long before forwarding it (a slow database). */
  setDelayMs(ms: number): void;
  /** Answers every request with this status without reaching the target (e.g. 401); undefined: forward. */
  setStatus(status: number | undefined): void;
  /** Requests answered with the status set by setStatus. */
  refused(): number;
  close(): Promise<void>;
}

/** An HTTP proxy in front of a database that counts the line-protocol lines it forwarded successfully. */
export async function startCountingProxy(target: string, orderOf = 'oxygen'): Promise<CountingHttpProxy> {
  const { createServer: createHttp } = await import('node:http');
  const { gunzipSync } = await import('node:zlib');
  const lines = new Map<string, number>();
  const order: number[] = [];
  let up = true;
  let delayMs = 0;
  let status: number | undefined;
  let refused = 0;
  const server = createHttp((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => void forward());
    const forward = async (): Promise<void> => {
      if (delayMs > 0) await new Promise((r) => setTimeout(r, delayMs));
      if (!up) {
        res.writeHead(503).end('down');
        return;
      }
      if (status !== undefined) {
        refused++;
        res.writeHead(status).end(JSON.stringify({ code: 'unauthorized', message: 'token not valid' }));
        return;
      }
      const body = Buffer.concat(chunks);
      const headers: Record<string, string> = {};
      for (const [k, v] of Object.entries(req.headers))
        if (typeof v === 'string' && k !== 'host' && k !== 'content-length') headers[k] = v;
      fetch(`${target}${req.url ?? '/'}`, {
        method: req.method ?? 'GET',
        headers,
        ...(req.method === 'POST' ? { body } : {}),
      })
        .then(async (r) => {
          const text = await r.text();
          if (r.ok && req.method === 'POST') {
            const plain = req.headers['content-encoding'] === 'gzip' ? gunzipSync(body) : body;
            for (const l of plain.toString('utf8').split('\n')) {
              if (l.trim() === '') continue;
              const m = /^([^,\s]+)/.exec(l)?.[1] ?? '';
              lines.set(m, (lines.get(m) ?? 0) + 1);
              if (m === orderOf) order.push(Number(l.slice(l.lastIndexOf(' ') + 1)));
            }
          }
          res.writeHead(r.status).end(text);
        })
        .catch(() => res.writeHead(502).end('bad gateway'));
    };
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}`,
    lines,
    order,
    setUp: (u) => {
      up = u;
    },
    setDelayMs: (ms) => {
      delayMs = ms;
    },
    setStatus: (s) => {
      status = s;
    },
    refused: () => refused,
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}
