// The daemon as a child process (`node bin/reefd.js run`), with a configuration of the case's own.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pollUntil } from '../../integration/env.js';
import { freePort } from './procs.js';

export const REPO = resolve(import.meta.dirname, '../../..');
export const BIN = join(REPO, 'bin/reefd.js');

/** One station with a CTD and an optode: every oxygen message with a CTD beside it gives one oxygen record. */
export function faultConfig(o: {
  prefix: string;
  site: string;
  dataDir: string;
  mqttUrl?: string;
  clientId?: string;
  influxUrl?: string;
  kafka?: { brokers: string[]; topic: string };
  /** An NDJSON output at this path. */
  ndjsonPath?: string;
  spoolMaxMb?: number;
  deadLetterPerMin?: number;
  latenessMin?: number;
  extra?: Record<string, unknown>;
}): Record<string, unknown> {
  return {
    site: o.site,
    topic_prefix: o.prefix,
    reef_axis_deg: 270,
    stations: {
      s1: { sensors: { c1: { kind: 'ctd' }, o1: { kind: 'oxygen' } } },
    },
    processing: { lateness_min: o.latenessMin ?? 10 },
    ...(o.mqttUrl !== undefined
      ? { sources: { mqtt: { url: o.mqttUrl, client_id: o.clientId ?? `reefd-${o.prefix}` } } }
      : {}),
    outputs: {
      ...(o.influxUrl !== undefined
        ? {
            influx: {
              url: o.influxUrl,
              api: 'v2',
              bucket: o.site,
              flush_ms: 200,
              ...(o.spoolMaxMb !== undefined ? { spool_max_mb: o.spoolMaxMb } : {}),
            },
          }
        : {}),
      ...(o.kafka ? { kafka: o.kafka } : {}),
      ...(o.ndjsonPath !== undefined ? { ndjson: { path: o.ndjsonPath } } : {}),
      dead_letter: { max_per_min: o.deadLetterPerMin ?? 600 },
    },
    archive: { fsync_ms: 50 },
    data_dir: o.dataDir,
    http: { port: 0 },
    ...(o.extra ?? {}),
  };
}

/** Writes the configuration into its data folder (removed with it), or into a fresh temp folder. */
export function writeConfig(cfg: Record<string, unknown>): string {
  const dir =
    typeof cfg.data_dir === 'string' ? cfg.data_dir : mkdtempSync(join(tmpdir(), 'reefd-faults-cfg-'));
  const file = join(dir, 'reefd-fault-case.yaml');
  // JSON is YAML.
  writeFileSync(file, JSON.stringify(cfg, null, 2));
  return file;
}

export interface DaemonChild {
  child: ChildProcess;
  url: string;
  stderr(): string;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  metrics(): Promise<Map<string, number>>;
  /** One metric summed over every label set matching `labelPart` (e.g. `kind="oxygen"`). */
  metric(name: string, labelPart?: string): Promise<number>;
  rssBytes(): Promise<number>;
  /** Memory after a forced, settled GC (the child must run with GC_PROBE). */
  settledMemory(timeoutMs?: number): Promise<SettledMemory>;
  kill(signal: NodeJS.Signals): Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

/** Node options for a child whose memory is measured: exposed GC and the SIGUSR2 probe (gc-probe.mjs). */
export const GC_PROBE = ['--expose-gc', '--import', join(REPO, 'test/faults/helpers/gc-probe.mjs')];

export interface SettledMemory {
  heapUsed: number;
  external: number;
  arrayBuffers: number;
  rss: number;
  rounds: number;
}

export async function spawnDaemon(
  configFile: string,
  logLevel = 'warn',
  nodeArgs: readonly string[] = [],
): Promise<DaemonChild> {
  const port = await freePort();
  const child = spawn(
    process.execPath,
    [...nodeArgs, BIN, 'run', '--config', configFile, '--port', String(port), '--log-level', logLevel],
    { cwd: REPO, stdio: ['ignore', 'ignore', 'pipe'] },
  );
  let err = '';
  child.stderr?.setEncoding('utf8').on('data', (d: string) => {
    err += d;
    if (err.length > 2_000_000) err = err.slice(-1_000_000);
  });
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((r) =>
    child.once('exit', (code, signal) => r({ code, signal })),
  );
  const url = `http://127.0.0.1:${port}`;
  let gone = false;
  void exited.then(() => (gone = true));
  await pollUntil(
    'reefd /readyz',
    async () => {
      if (gone) throw new Error(`reefd exited early: ${err.slice(-2000)}`);
      const r = await fetch(`${url}/readyz`);
      return r.ok ? true : undefined;
    },
    30_000,
    100,
  );
  const metrics = async (): Promise<Map<string, number>> => {
    const text = await fetch(`${url}/metrics`).then((r) => r.text());
    const m = new Map<string, number>();
    for (const line of text.split('\n')) {
      if (line.startsWith('#') || line.trim() === '') continue;
      const i = line.lastIndexOf(' ');
      m.set(line.slice(0, i), Number(line.slice(i + 1)));
    }
    return m;
  };
  return {
    child,
    url,
    stderr: () => err,
    exited,
    metrics,
    metric: async (name, labelPart) => {
      let sum = 0;
      for (const [k, v] of await metrics()) {
        const base = k.split('{')[0];
        if (base === name && (labelPart === undefined || k.includes(labelPart))) sum += v;
      }
      return sum;
    },
    rssBytes: async () => {
      const s = await readFile(`/proc/${child.pid}/status`, 'utf8');
      const kb = /VmRSS:\s+(\d+) kB/.exec(s)?.[1];
      return Number(kb) * 1024;
    },
    settledMemory: async (timeoutMs = 30_000) => {
      const from = err.length;
      child.kill('SIGUSR2');
      const end = Date.now() + timeoutMs;
      for (;;) {
        const m = /reefd-gc-probe (\{.*\})\n/.exec(err.slice(from));
        if (m?.[1] !== undefined) {
          const v = JSON.parse(m[1]) as SettledMemory & { error?: string };
          if (v.error !== undefined) throw new Error(v.error);
          return v;
        }
        if (Date.now() > end || gone) throw new Error('the daemon did not answer the GC probe');
        await new Promise((r) => setTimeout(r, 50));
      }
    },
    kill: async (signal) => {
      if (!gone) child.kill(signal);
      return exited;
    },
  };
}
