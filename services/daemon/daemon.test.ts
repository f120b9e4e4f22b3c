// The daemon started and stopped with no outside service: the demo's embedded broker (in this process),
// an NDJSON output and a webhook notification channel whose key file is named relative to the
// configuration's folder. Checks the order of start and stop, the bus, the checkpoint and the output; a
// restart over the same folder writes no record twice; a start that fails closes what it had started and
// a `reefd run` in a child process exits instead of hanging; `reefd run` refuses a config without sources.
import { spawn } from 'node:child_process';
import { chmod, mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import mqtt from 'mqtt';
import pino from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText, type DerivedRecord, type ReefdConfig } from '../../libs/contract/index.js';
import { startEmbeddedBroker, type EmbeddedBroker } from '../broker/embedded.js';
import { captureIo } from '../cli/testing.js';
import { run as runCommand } from '../cli/commands/run.js';
import { startDaemon } from './daemon.js';
import { createMetrics } from './metrics.js';

let broker: EmbeddedBroker;
let dir: string;
beforeAll(async () => {
  broker = await startEmbeddedBroker('127.0.0.1', 0);
  dir = await mkdtemp(path.join(tmpdir(), 'reefd-daemon-'));
});
afterAll(async () => {
  await broker.close();
  await rm(dir, { recursive: true, force: true });
});

const quiet = () => pino({ level: 'silent' });

function siteConfig(
  folder: string,
  extra = '',
  outputs = '  ndjson: { path: records.ndjson }\n',
): ReefdConfig {
  const r = parseConfigText(`site: hermetic
reef_axis_deg: 270
stations:
  s1:
    sensors:
      c1: { kind: ctd }
      o1: { kind: oxygen }
sources:
  mqtt: { url: "${broker.url}", client_id: "reefd-${path.basename(folder)}" }
outputs:
${outputs}data_dir: data
notify:
  channels:
    hook: { type: webhook, url: "http://127.0.0.1:9/none", secret: { file: hook.key } }
${extra}`);
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.config;
}

async function publish(site: string, fromMin: number, n: number): Promise<void> {
  const c = await mqtt.connectAsync(broker.url, { protocolVersion: 4, clientId: `pub-${Math.random()}` });
  const t0 = Date.UTC(2026, 2, 1);
  for (let i = fromMin; i < fromMin + n; i++) {
    const t = new Date(t0 + i * 60_000).toISOString();
    await c.publishAsync(`reef/${site}/s1/ctd/c1`, JSON.stringify({ v: 1, t, temp_c: 27, sal: 35 }), {
      qos: 1,
    });
    await c.publishAsync(
      `reef/${site}/s1/oxygen/o1`,
      JSON.stringify({ v: 1, t, o2_umol_l: 200, temp_c: 27 }),
      {
        qos: 1,
      },
    );
  }
  await c.endAsync();
}

async function until(
  what: string,
  probe: () => Promise<boolean> | boolean,
  timeoutMs = 15_000,
): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (!(await probe())) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 20));
  }
}

const lines = async (file: string): Promise<DerivedRecord[]> =>
  (await readFile(file, 'utf8').catch(() => ''))
    .split('\n')
    .filter((l) => l !== '')
    .map((l) => JSON.parse(l) as DerivedRecord);

describe('the daemon with no outside service', () => {
  it.each([
    ['in-process', false],
    ['in a worker thread', true],
  ])(
    'starts in order, delivers through the bus and the output, stops everything, restarts without doubling (processor %s)',
    async (_where, processorWorker) => {
      const folder = await mkdtemp(path.join(dir, 'site-'));
      await writeFile(path.join(folder, 'hook.key'), 'k3y', { mode: 0o600 });
      const config = siteConfig(folder);
      const seen: DerivedRecord[] = [];
      const d = await startDaemon({
        config,
        baseDir: folder,
        logger: quiet(),
        env: {},
        mqttProtocolVersion: 4,
        processorWorker,
      });
      expect(d.dataDir).toBe(path.join(folder, 'data'));
      const off = d.bus.subscribe((rs) => seen.push(...rs));
      await until('the source connected', () => d.ready());
      await publish('hermetic', 0, 5);
      await until(
        'five oxygen records on the bus',
        () => seen.filter((r) => r.type === 'oxygen').length === 5,
      );
      off();
      await d.stop('test');
      expect(d.bus.size()).toBe(0); // the notifier unsubscribed when it stopped
      const out = await lines(path.join(folder, 'records.ndjson'));
      expect(out.filter((r) => r.type === 'oxygen').map((r) => r.t)).toEqual(
        [0, 1, 2, 3, 4].map((i) => new Date(Date.UTC(2026, 2, 1) + i * 60_000).toISOString()),
      );
      const cp = JSON.parse(await readFile(path.join(folder, 'data', 'checkpoint.json'), 'utf8')) as {
        stream: { nextPos: number; cursor: { lines: number } };
        state: { counters: { accepted: number } };
      };
      expect(cp.stream.cursor.lines).toBe(10);
      expect(cp.state.counters.accepted).toBe(10);
      expect(cp.stream.nextPos).toBe(out.length);

      // The same folder again: nothing of the first run is written twice, the new messages once.
      const d2 = await startDaemon({
        config,
        baseDir: folder,
        logger: quiet(),
        env: {},
        mqttProtocolVersion: 4,
        processorWorker,
      });
      await until('the source connected again', () => d2.ready());
      await publish('hermetic', 5, 2);
      await until('seven oxygen records in the file', async () => {
        await d2.checkpoint();
        return (
          (await lines(path.join(folder, 'records.ndjson'))).filter((r) => r.type === 'oxygen').length >= 7
        );
      });
      await d2.stop('test');
      const again = await lines(path.join(folder, 'records.ndjson'));
      const oxygen = again.filter((r) => r.type === 'oxygen').map((r) => r.t);
      expect(oxygen).toHaveLength(7);
      expect(new Set(oxygen).size).toBe(7);
    },
  );

  it('starts with a spool left near its bound by a long database outage, and raises the alert', async () => {
    const folder = await mkdtemp(path.join(dir, 'spool-'));
    await writeFile(path.join(folder, 'hook.key'), 'k3y', { mode: 0o600 });
    // The database is a closed port; the spool an earlier run left holds 9 kB of a 10 kB bound (90 %).
    const config = siteConfig(
      folder,
      '',
      '  ndjson: { path: records.ndjson }\n  influx: { url: "http://127.0.0.1:9", spool_max_mb: 0.01 }\n',
    );
    const spool = path.join(folder, 'data', 'spool', 'influx');
    await mkdir(spool, { recursive: true });
    const line = 'oxygen,site=hermetic,station=s1 o2_umol_kg=200 1767225600000\n';
    await writeFile(path.join(spool, 'seg-000000000001.spool'), line.repeat(Math.ceil(9000 / line.length)));
    const d = await startDaemon({
      config,
      baseDir: folder,
      logger: quiet(),
      env: {},
      mqttProtocolVersion: 4,
    });
    await d.stop('test');
    // Raised during the start, before anyone could subscribe: the notifier (started first) queued it.
    const outbox = await readFile(path.join(folder, 'data', 'alerts', 'outbox.jsonl'), 'utf8');
    expect(outbox).toContain('"rule":"reefd.spool_near_limit"');
  });

  it('keeps a raised site_silent across a restart and clears it with the first message after', async () => {
    const folder = await mkdtemp(path.join(dir, 'silent-'));
    await writeFile(path.join(folder, 'hook.key'), 'k3y', { mode: 0o600 });
    const config = siteConfig(folder, 'alerts: { silence_min: 0.02 }\n');
    const seen: DerivedRecord[] = [];
    const a = await startDaemon({
      config,
      baseDir: folder,
      logger: quiet(),
      env: {},
      mqttProtocolVersion: 4,
    });
    const offA = a.bus.subscribe((rs) =>
      seen.push(...rs.filter((r) => r.type === 'alert' && r.rule === 'site_silent')),
    );
    await until('site_silent raised (1.2 s without a message)', () => seen.length === 1);
    offA();
    await a.stop('test');
    const cp = JSON.parse(await readFile(path.join(folder, 'data', 'checkpoint.json'), 'utf8')) as {
      silence: { raisedAtMs: number | null };
    };
    expect(cp.silence.raisedAtMs).not.toBeNull();
    const b = await startDaemon({
      config,
      baseDir: folder,
      logger: quiet(),
      env: {},
      mqttProtocolVersion: 4,
    });
    b.bus.subscribe((rs) => seen.push(...rs.filter((r) => r.type === 'alert' && r.rule === 'site_silent')));
    await until('the source connected', () => b.ready());
    await publish('hermetic', 0, 1);
    await until('site_silent cleared', () => seen.length === 2);
    await b.stop('test');
    expect(seen.map((r) => (r as { state: string }).state)).toEqual(['raised', 'cleared']);
    expect(seen[1]?.id).toBe(seen[0]?.id);
  });

  it('closes what it started, in reverse, when a step fails (a broker password readable by others)', async () => {
    const folder = await mkdtemp(path.join(dir, 'bad-'));
    await writeFile(path.join(folder, 'hook.key'), 'k3y', { mode: 0o600 });
    await writeFile(path.join(folder, 'mqtt.pass'), 'pw');
    await chmod(path.join(folder, 'mqtt.pass'), 0o644);
    const config = siteConfig(folder);
    const bad = {
      ...config,
      sources: { mqtt: { ...config.sources!.mqtt!, password: { file: 'mqtt.pass' } } },
    } as ReefdConfig;
    const logs: { msg: string; parts?: string[]; part?: string }[] = [];
    const logger = pino(
      { level: 'info' },
      { write: (line: string) => void logs.push(JSON.parse(line) as (typeof logs)[number]) },
    );
    await expect(
      startDaemon({
        config: bad,
        baseDir: folder,
        logger,
        env: {},
        mqttProtocolVersion: 4,
        metrics: createMetrics(false),
      }),
    ).rejects.toMatchObject({ code: 'REEFD_SECRET_PERMISSIONS' });
    const failed = logs.find((l) => l.msg === 'start failed; stopping what was started');
    // Everything before the sources had started (the notifier first, as in the field report) ...
    expect(failed?.parts).toEqual([
      'notifier',
      'raw archive',
      'record outputs',
      'dead letters',
      'silence watch',
      'checkpointer',
    ]);
    // ... and every part closed without error.
    expect(logs.filter((l) => l.msg.startsWith('stop: part'))).toEqual([]);
    expect(logs.some((l) => l.msg === 'reefd started')).toBe(false);
    // The folder is free again: a daemon with a good configuration starts on it.
    const ok = await startDaemon({
      config,
      baseDir: folder,
      logger: quiet(),
      env: {},
      mqttProtocolVersion: 4,
    });
    await ok.stop('test');
  });

  it('`reefd run` exits (2: a secret readable by others is for the operator to fix) instead of hanging when the start fails after the notifier started', async () => {
    const folder = await mkdtemp(path.join(dir, 'child-'));
    await writeFile(path.join(folder, 'hook.key'), 'k3y', { mode: 0o600 });
    await writeFile(path.join(folder, 'mqtt.pass'), 'pw');
    await chmod(path.join(folder, 'mqtt.pass'), 0o644);
    const file = path.join(folder, 'site.yaml');
    await writeFile(
      file,
      `site: child
reef_axis_deg: 270
stations: { s1: { sensors: { c1: { kind: ctd } } } }
sources: { mqtt: { url: "${broker.url}", password: { file: mqtt.pass } } }
data_dir: data
notify: { channels: { hook: { type: webhook, url: "http://127.0.0.1:9/none", secret: { file: hook.key } } } }
`,
    );
    const root = path.resolve(import.meta.dirname, '../..');
    const child = spawn(
      process.execPath,
      [
        '--import',
        'tsx',
        '-e',
        `import { main } from './services/cli/main.ts'; process.exitCode = await main(['run', '--config', ${JSON.stringify(file)}, '--log-level', 'error']);`,
      ],
      { cwd: root, stdio: ['ignore', 'ignore', 'pipe'] },
    );
    let err = '';
    child.stderr.setEncoding('utf8').on('data', (s: string) => (err += s));
    const exit = await new Promise<number | null>((resolve) => {
      const t = setTimeout(() => {
        child.kill('SIGKILL');
        resolve(null);
      }, 30_000);
      child.once('exit', (code) => {
        clearTimeout(t);
        resolve(code);
      });
    });
    // Exit 2: only the operator can fix it, so systemd does not restart into it (RestartPreventExitStatus=2).
    expect(exit).toBe(2);
    expect(err).toContain('REEFD_SECRET_PERMISSIONS');
  }, 40_000);

  it('`reefd run` refuses a configuration without sources (exit 2, says what to add)', async () => {
    const file = path.join(dir, 'no-sources.yaml');
    await writeFile(file, 'site: quiet\nreef_axis_deg: 270\nstations: {}\ndata_dir: data\n');
    const io = captureIo({});
    expect(await runCommand(['--config', file, '--log-level', 'silent'], io)).toBe(2);
    expect(io.text().stderr).toMatch(/REEFD_NO_SOURCE: .* has no sources.*add sources\.mqtt/);
  });
});

describe('the daemon on /metrics', () => {
  it('shows its source connected, the sensors it heard and their age, and lets go of them at stop (logs name their component)', async () => {
    const folder = await mkdtemp(path.join(dir, 'metrics-'));
    await writeFile(path.join(folder, 'hook.key'), 'k3y', { mode: 0o600 });
    const metrics = createMetrics(false);
    const nowMs = Date.UTC(2026, 2, 1) + 10 * 60_000;
    const logs: { msg: string; component?: string }[] = [];
    const logger = pino(
      { level: 'info' },
      { write: (line: string) => void logs.push(JSON.parse(line) as (typeof logs)[number]) },
    );
    const d = await startDaemon({
      config: siteConfig(folder),
      baseDir: folder,
      logger,
      env: {},
      mqttProtocolVersion: 4,
      metrics,
      clock: () => nowMs,
    });
    await until('the source connected', () => d.ready());
    await publish('hermetic', 0, 2);
    await until('both sensors seen', () => d.processor.sensorHealth().length === 2);
    const text = await metrics.registry.metrics();
    expect(text).toMatch(/^reefd_source_connected\{source="[^"]+"\} 1$/m);
    // The last messages are at minute 1; the daemon's clock says minute 10: 540 s.
    expect(text).toContain('reefd_sensor_last_seen_age_seconds{station="s1",sensor="c1",kind="ctd"} 540');
    expect(text).toContain('reefd_sensor_last_seen_age_seconds{station="s1",sensor="o1",kind="oxygen"} 540');
    expect(text).toMatch(/^reefd_build_info\{version="\d+\.\d+\.\d+",node="v\d+/m);
    await d.stop('test');
    expect(d.bus.size()).toBe(0);
    expect(await metrics.registry.metrics()).not.toContain('reefd_source_connected{');
    // Each part logs through its own child logger, so a line names the component it comes from.
    expect(logs.find((l) => l.msg === 'mqtt connected')?.component).toBe('sources');
    expect(logs.find((l) => l.msg === 'reefd started')?.component).toBeUndefined();
  }, 40_000);
});
