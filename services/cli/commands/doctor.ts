// `reefd doctor --config FILE`: checks a live install and prints what to fix, one line per check.
import { execFile } from 'node:child_process';
import { access, constants, mkdir, statfs } from 'node:fs/promises';
import net from 'node:net';
import path from 'node:path';
import { formatProblem, type ReefdConfig, type SecretRef } from '../../../libs/contract/index.js';
import { loadConfigFile, resolveDataDir, resolveSecret } from '../../config/load.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';
import { parseCommand } from '../args.js';

const HELP = `Usage: reefd doctor --config FILE [--timeout-ms N]

Checks a live install: configuration, secrets, data folder and free space, the MQTT broker,
the database and Kafka, and clock synchronisation. Prints one line per check with what to fix.
Exit 0 when every check passes, 1 otherwise.
`;

type Status = 'ok' | 'warn' | 'fail';
interface Check {
  name: string;
  status: Status;
  detail: string;
}

function tcpProbe(host: string, port: number, timeoutMs: number): Promise<string | undefined> {
  return new Promise((resolve) => {
    const sock = net.connect({ host, port });
    const done = (err?: string) => {
      sock.destroy();
      resolve(err);
    };
    sock.setTimeout(timeoutMs, () => done(`no answer within ${timeoutMs} ms`));
    sock.once('connect', () => done());
    sock.once('error', (e) => done(e.message));
  });
}

function hostPort(url: string, defaultPort: number): { host: string; port: number } {
  const u = new URL(url.includes('://') ? url : `tcp://${url}`);
  return { host: u.hostname, port: u.port ? Number(u.port) : defaultPort };
}

async function httpProbe(url: string, timeoutMs: number): Promise<string | undefined> {
  try {
    const r = await fetch(url, { signal: AbortSignal.timeout(timeoutMs) });
    return r.status < 500 ? undefined : `HTTP ${r.status}`;
  } catch (err) {
    return (err as Error).message;
  }
}

function clockSynced(): Promise<Check> {
  return new Promise((resolve) => {
    execFile('timedatectl', ['show', '-p', 'NTPSynchronized', '--value'], { timeout: 3000 }, (err, out) => {
      if (err) {
        resolve({
          name: 'clock',
          status: 'warn',
          detail:
            'cannot ask timedatectl; make sure NTP (chrony or systemd-timesyncd) runs: event times come from the sensors, but receive times and the timing test use this clock',
        });
        return;
      }
      const yes = out.trim() === 'yes';
      resolve({
        name: 'clock',
        status: yes ? 'ok' : 'fail',
        detail: yes ? 'NTP synchronised' : 'not NTP synchronised: enable chrony or systemd-timesyncd',
      });
    });
  });
}

type Env = CliIo['env'];

/** Every check, in the order they are printed. */
async function checks(config: ReefdConfig, io: CliIo, base: string, timeoutMs: number): Promise<Check[]> {
  return [
    ...sourcesCheck(config),
    await dataFolderCheck(config, base, io.env),
    ...(await ndjsonCheck(config, base)),
    ...(await mqttChecks(config, io.env, base, timeoutMs)),
    ...(await kafkaChecks(config, timeoutMs)),
    ...(await databaseChecks(config, io.env, base, timeoutMs)),
    ...(await secretCheck('http.token', config.http.token, io.env, base)),
    ...dashboardCheck(config),
    await clockSynced(),
  ];
}

/** A secret the configuration names can be read (nothing to check when none is named). */
async function secretCheck(
  name: string,
  ref: SecretRef | undefined,
  env: Env,
  base: string,
): Promise<Check[]> {
  if (!ref) return [];
  try {
    await resolveSecret(ref, env, base);
    return [{ name: `secret ${name}`, status: 'ok', detail: 'available' }];
  } catch (err) {
    return [{ name: `secret ${name}`, status: 'fail', detail: (err as Error).message }];
  }
}

function sourcesCheck(config: ReefdConfig): Check[] {
  if (config.sources?.mqtt !== undefined || config.sources?.kafka !== undefined) return [];
  return [
    {
      name: 'sources',
      status: 'fail',
      detail:
        'none configured: reefd run refuses to start (REEFD_NO_SOURCE); add sources.mqtt or sources.kafka',
    },
  ];
}

/** The data folder exists (it is created), is writable, and has room for the archive. */
async function dataFolderCheck(config: ReefdConfig, base: string, env: Env): Promise<Check> {
  const dataDir = resolveDataDir(config, base, env);
  try {
    await mkdir(dataDir, { recursive: true });
    await access(dataDir, constants.W_OK);
    const fs = await statfs(dataDir);
    const freeGb = (fs.bavail * fs.bsize) / 1e9;
    return {
      name: 'data folder',
      status: freeGb < 1 ? 'fail' : freeGb < 10 ? 'warn' : 'ok',
      detail: `${dataDir}: ${freeGb.toFixed(1)} GB free${freeGb < 10 ? ' (a deployment archive grows by ~0.1-1 GB a week; free space or move data_dir)' : ''}`,
    };
  } catch (err) {
    return {
      name: 'data folder',
      status: 'fail',
      detail: `${dataDir}: ${(err as Error).message}; create it and give the reefd user write access`,
    };
  }
}

async function ndjsonCheck(config: ReefdConfig, base: string): Promise<Check[]> {
  const ndjson = config.outputs.ndjson;
  if (!ndjson) return [];
  const folder = path.dirname(path.resolve(base, ndjson.path));
  try {
    await access(folder, constants.W_OK);
    return [{ name: 'ndjson output', status: 'ok', detail: `${folder} is writable` }];
  } catch (err) {
    return [
      {
        name: 'ndjson output',
        status: 'fail',
        detail: `${folder}: ${(err as Error).message}; write the records under the data folder (an absolute path) or give the reefd user write access`,
      },
    ];
  }
}

/** The MQTT broker answers on its port, and its password can be read. */
async function mqttChecks(config: ReefdConfig, env: Env, base: string, timeoutMs: number): Promise<Check[]> {
  const mqtt = config.sources?.mqtt;
  if (!mqtt) return [];
  const { host, port } = hostPort(mqtt.url, mqtt.url.startsWith('mqtts') ? 8883 : 1883);
  const e = await tcpProbe(host, port, timeoutMs);
  return [
    {
      name: 'mqtt broker',
      status: e ? 'fail' : 'ok',
      detail: e
        ? `${host}:${port}: ${e}; start the broker or fix sources.mqtt.url`
        : `${host}:${port} reachable`,
    },
    ...(await secretCheck('sources.mqtt.password', mqtt.password, env, base)),
  ];
}

/** Each Kafka broker (of the source, else of the output) answers on its port. */
async function kafkaChecks(config: ReefdConfig, timeoutMs: number): Promise<Check[]> {
  const kafka = config.sources?.kafka ?? config.outputs.kafka;
  if (!kafka) return [];
  const out: Check[] = [];
  for (const b of kafka.brokers) {
    const { host, port } = hostPort(b, 9092);
    const e = await tcpProbe(host, port, timeoutMs);
    out.push({
      name: `kafka ${b}`,
      status: e ? 'fail' : 'ok',
      detail: e ? `${e}; start Kafka or fix the brokers list` : 'reachable',
    });
  }
  return out;
}

/** The time-series database answers its health endpoint, and its token can be read. */
async function databaseChecks(
  config: ReefdConfig,
  env: Env,
  base: string,
  timeoutMs: number,
): Promise<Check[]> {
  const influx = config.outputs.influx;
  if (!influx) return [];
  const probe = influx.api === 'v1' ? new URL('/ping', influx.url).href : new URL('/health', influx.url).href;
  const e = await httpProbe(probe, timeoutMs);
  return [
    {
      name: 'database',
      status: e ? 'fail' : 'ok',
      detail: e ? `${probe}: ${e}; records spool on disk until it answers` : `${probe} answers`,
    },
    ...(await secretCheck('outputs.influx.token', influx.token, env, base)),
  ];
}

/** A dashboard bound beyond the loopback needs a token. */
function dashboardCheck(config: ReefdConfig): Check[] {
  if (config.http.host === '127.0.0.1' || config.http.host === 'localhost' || config.http.token) return [];
  return [
    {
      name: 'dashboard',
      status: 'fail',
      detail: `bound to ${config.http.host} without http.token: anyone on the LAN can read and acknowledge; set a token`,
    },
  ];
}

export const run: CommandRun = async (args, io) => {
  const parsed = parseCommand(
    'doctor',
    args,
    {
      config: { type: 'string' },
      'timeout-ms': { type: 'string', default: '3000' },
    },
    HELP,
    io,
  );
  if (!parsed.ok) return parsed.exit;
  const values = parsed.values;
  if (!values.config) {
    io.stderr(`reefd doctor: --config is required\n\n${HELP}`);
    return EXIT_USAGE;
  }
  let cfg;
  try {
    cfg = await loadConfigFile(values.config);
  } catch (err) {
    io.stdout(`FAIL  config: ${(err as Error).message}\n`);
    return EXIT_FAILURE;
  }
  if (!cfg.ok) {
    io.stdout(`FAIL  config: ${values.config} has ${cfg.problems.length} problem(s):\n`);
    for (const p of cfg.problems) io.stdout(`        ${formatProblem(p)}\n`);
    return EXIT_FAILURE;
  }
  io.stdout(`ok    config: ${values.config} is valid\n`);
  const list = await checks(
    cfg.config,
    io,
    path.dirname(path.resolve(values.config)),
    Number(values['timeout-ms']),
  );
  for (const c of list)
    io.stdout(
      `${c.status === 'ok' ? 'ok  ' : c.status === 'warn' ? 'warn' : 'FAIL'}  ${c.name}: ${c.detail}\n`,
    );
  const failed = list.filter((c) => c.status === 'fail').length;
  io.stdout(failed === 0 ? 'reefd doctor: all checks passed\n' : `reefd doctor: ${failed} check(s) failed\n`);
  return failed === 0 ? EXIT_OK : EXIT_FAILURE;
};
