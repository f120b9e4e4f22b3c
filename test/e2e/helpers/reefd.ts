// Spawns the real reefd command (from the sources, see cli.ts) for end-to-end tests and benchmarks:
// `reefd run` as a child process with a generated configuration, and `reefd replay`.
import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse, stringify } from 'yaml';
import { parseConfigText, type ReefdConfig } from '../../../libs/contract/index.js';

const here = path.dirname(fileURLToPath(import.meta.url));
export const REPO_ROOT = path.resolve(here, '../../..');
const CLI = path.join(here, 'cli.ts');

/** The fictional demo site (deploy/demo/ornen-reef.yaml) as a parsed configuration. */
export function demoConfig(): ReefdConfig {
  const r = parseConfigText(readFileSync(path.join(REPO_ROOT, 'deploy/demo/ornen-reef.yaml'), 'utf8'));
  if (!r.ok) throw new Error(`REEFD_TEST_DEMO_CONFIG: ${JSON.stringify(r.problems)}`);
  return r.config;
}

/** The demo site's YAML as written (deploy/demo/ornen-reef.yaml), to extend with sources and outputs. */
export function demoYaml(): Record<string, unknown> {
  return parse(readFileSync(path.join(REPO_ROOT, 'deploy/demo/ornen-reef.yaml'), 'utf8')) as Record<
    string,
    unknown
  >;
}

/** Parses a configuration object (as written to YAML) the way the daemon will. */
export function parsedConfig(cfg: Record<string, unknown>): ReefdConfig {
  const r = parseConfigText(stringify(cfg));
  if (!r.ok) throw new Error(`REEFD_TEST_CONFIG: ${JSON.stringify(r.problems)}`);
  return r.config;
}

/** Writes a configuration file; returns its path. Validates it first so a test fails with the problem. */
export function writeConfig(file: string, cfg: Record<string, unknown>): string {
  const text = stringify(cfg);
  const r = parseConfigText(text);
  if (!r.ok) throw new Error(`REEFD_TEST_CONFIG: ${JSON.stringify(r.problems)}`);
  writeFileSync(file, text);
  return file;
}

export interface RunningReefd {
  url: string;
  child: ChildProcess;
  /** Every stderr log line so far, parsed where it is JSON. */
  logs: Record<string, unknown>[];
  /** Sum of a Prometheus counter over all label sets. */
  counter(name: string): Promise<number>;
  /** SIGTERM, then the exit code (rejects if the daemon takes more than `timeoutMs`). */
  stop(timeoutMs?: number): Promise<number | null>;
}

function nodeArgs(args: string[], nodeFlags: readonly string[] = []): string[] {
  return [...nodeFlags, '--import', 'tsx', CLI, ...args];
}

/** `reefd run --config FILE`; resolves once the HTTP front listens (the "dashboard listening" log line). */
export async function startReefd(
  configFile: string,
  extraArgs: string[] = [],
  /** Flags for node itself (e.g. --cpu-prof for a profile of the daemon). */
  nodeFlags: readonly string[] = [],
): Promise<RunningReefd> {
  const child = spawn(process.execPath, nodeArgs(['run', '--config', configFile, ...extraArgs], nodeFlags), {
    cwd: REPO_ROOT,
    stdio: ['ignore', 'ignore', 'pipe'],
    env: { ...process.env, NODE_OPTIONS: '' },
  });
  const logs: Record<string, unknown>[] = [];
  let buf = '';
  let exited: number | null | undefined;
  const exit = new Promise<number | null>((r) =>
    child.once('exit', (code) => {
      exited = code;
      r(code);
    }),
  );
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`REEFD_TEST_DAEMON_START: no "dashboard listening" in 60 s; log: ${buf}`)),
      60_000,
    );
    child.stderr?.setEncoding('utf8');
    child.stderr?.on('data', (chunk: string) => {
      buf += chunk;
      let nl: number;
      while ((nl = buf.indexOf('\n')) >= 0) {
        const line = buf.slice(0, nl);
        buf = buf.slice(nl + 1);
        let rec: Record<string, unknown>;
        try {
          rec = JSON.parse(line) as Record<string, unknown>;
        } catch {
          rec = { raw: line };
        }
        logs.push(rec);
        if (rec.msg === 'dashboard listening' && typeof rec.url === 'string') {
          clearTimeout(timer);
          resolve(rec.url);
        }
      }
    });
    void exit.then((code) => {
      clearTimeout(timer);
      reject(
        new Error(`REEFD_TEST_DAEMON_START: exited ${code} before listening; log: ${JSON.stringify(logs)}`),
      );
    });
  });
  return {
    url,
    child,
    logs,
    async counter(name) {
      const text = await (await fetch(`${url}/metrics`)).text();
      let sum = 0;
      for (const line of text.split('\n')) {
        if (line.startsWith(`${name}{`) || line.startsWith(`${name} `))
          sum += Number(line.slice(line.lastIndexOf(' ') + 1));
      }
      return sum;
    },
    async stop(timeoutMs = 15_000) {
      if (exited !== undefined) return exited;
      child.kill('SIGTERM');
      const t = new Promise<never>((_, reject) =>
        setTimeout(
          () => reject(new Error(`REEFD_TEST_DAEMON_STOP: still running ${timeoutMs} ms after SIGTERM`)),
          timeoutMs,
        ).unref(),
      );
      return Promise.race([exit, t]);
    },
  };
}

/** `reefd replay --config FILE --input ARCHIVE --out OUT`; resolves with the exit code and stderr. */
export async function runReplay(
  configFile: string,
  input: string,
  out: string,
  extra: string[] = [],
): Promise<{ code: number | null; stderr: string }> {
  const child = spawn(
    process.execPath,
    nodeArgs(['replay', '--config', configFile, '--input', input, '--out', out, ...extra]),
    { cwd: REPO_ROOT, stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, NODE_OPTIONS: '' } },
  );
  let stderr = '';
  child.stderr.setEncoding('utf8');
  child.stderr.on('data', (c: string) => (stderr += c));
  const code = await new Promise<number | null>((r) => child.once('exit', r));
  return { code, stderr };
}
