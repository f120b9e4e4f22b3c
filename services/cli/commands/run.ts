// `reefd run [--config FILE]`: the daemon. Without a configuration: the built-in demo (embedded broker,
// simulated fictional reef, local data folder, dashboard on http://127.0.0.1:8080 or the next free port).
import path from 'node:path';
import type { ReefdConfig } from '../../../libs/contract/index.js';
import { formatProblem } from '../../../libs/contract/index.js';
import { loadConfigFile } from '../../config/load.js';
import { startDaemon, type Daemon } from '../../daemon/daemon.js';
import { prepareDemo, type DemoSetup } from '../../daemon/demo.js';
import { startHttp, type HttpFront } from '../../daemon/http.js';
import { createLogger, errFields, LOG_LEVELS, type Logger } from '../../log/logger.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CommandRun } from '../io.js';
import { parseCommand } from '../args.js';

const HELP = `Usage: reefd run [--config FILE] [options]

Runs the daemon for the site in FILE. Without --config, runs the built-in demo: an embedded
MQTT broker, the simulated fictional Ornen Reef, the full pipeline writing to ./reefd-data/demo,
and the dashboard on http://127.0.0.1:8080 (the next free port if that one is taken).

Options:
  --config FILE      site configuration (see reefd config check)
  --port N           dashboard/HTTP port (overrides http.port)
  --data DIR         demo data folder (default ./reefd-data/demo)
  --speed X          demo simulation speed, simulated seconds per second (default 120)
  --seed N           demo random seed (default 1)
  --log-level LEVEL  ${LOG_LEVELS.join('|')} (default info)
`;

export const run: CommandRun = async (args, io) => {
  const parsed = parseCommand(
    'run',
    args,
    {
      config: { type: 'string' },
      port: { type: 'string' },
      data: { type: 'string' },
      speed: { type: 'string', default: '120' },
      seed: { type: 'string', default: '1' },
      'log-level': { type: 'string', default: 'info' },
    },
    HELP,
    io,
  );
  if (!parsed.ok) return parsed.exit;
  const values = parsed.values;
  const level = values['log-level'] as (typeof LOG_LEVELS)[number];
  if (!LOG_LEVELS.includes(level)) {
    io.stderr(`reefd run: --log-level must be one of ${LOG_LEVELS.join(', ')}\n`);
    return EXIT_USAGE;
  }
  const port = values.port === undefined ? undefined : Number(values.port);
  if (port !== undefined && !(Number.isInteger(port) && port >= 0 && port < 65536)) {
    io.stderr('reefd run: --port must be an integer 0-65535\n');
    return EXIT_USAGE;
  }
  const logger = createLogger({ level, pretty: Boolean(process.stderr.isTTY) });

  let config: ReefdConfig;
  let baseDir: string;
  let demo: DemoSetup | undefined;
  if (values.config) {
    const r = await loadConfigFile(values.config).catch((err: Error) => err);
    if (r instanceof Error) {
      io.stderr(`reefd run: ${r.message}\n`);
      return EXIT_USAGE;
    }
    if (!r.ok) {
      for (const p of r.problems) io.stderr(`${values.config}: ${formatProblem(p)}\n`);
      return EXIT_USAGE;
    }
    config = r.config;
    baseDir = path.dirname(path.resolve(values.config));
  } else {
    const speed = Number(values.speed);
    if (!(speed > 1)) {
      io.stderr('reefd run: --speed must be a number above 1 for the demo\n');
      return EXIT_USAGE;
    }
    demo = await prepareDemo({
      logger,
      dataDir: path.resolve(values.data ?? path.join('reefd-data', 'demo')),
      speed,
      backfillHours: 24,
      seed: Number(values.seed),
      httpPort: port ?? 8080,
    });
    config = demo.config;
    baseDir = process.cwd();
  }

  if (config.sources?.mqtt === undefined && config.sources?.kafka === undefined) {
    io.stderr(
      `reefd run: REEFD_NO_SOURCE: ${values.config} has no sources, so the daemon would receive nothing; ` +
        'add sources.mqtt (a broker URL) or sources.kafka (brokers and topic). reefd replay needs none.\n',
    );
    return EXIT_USAGE;
  }

  let http: HttpFront;
  let daemon: Daemon;
  try {
    daemon = await startDaemon({
      config,
      baseDir,
      logger,
      env: io.env,
      ...(demo ? { mqttProtocolVersion: 4 as const } : {}),
    });
  } catch (err) {
    // startDaemon has closed whatever it had started: returning lets the process exit.
    logger.fatal(errFields(err), 'reefd could not start');
    await demo?.broker.close();
    await flushLogger(logger);
    return isOperatorFix(err) ? EXIT_USAGE : EXIT_FAILURE;
  }
  try {
    http = await startHttp({
      config,
      daemon,
      logger,
      baseDir,
      env: io.env,
      ...(port !== undefined ? { port } : {}),
      tryNextPorts: demo !== undefined || port === undefined,
    });
  } catch (err) {
    logger.fatal(errFields(err), 'reefd could not open its HTTP port');
    await daemon.stop('http failed');
    await demo?.broker.close();
    await flushLogger(logger);
    return EXIT_FAILURE;
  }
  logger.info({ url: http.url }, 'dashboard listening');
  if (demo) io.stderr(`\nreefd demo: open ${http.url} in a browser (Ctrl-C to stop)\n\n`);

  const abort = new AbortController();
  const simulation = demo
    ?.simulate(abort.signal)
    .catch((err: unknown) => logger.error({ err: (err as Error).message }, 'simulator stopped'));

  await new Promise<void>((resolve) => {
    const onSignal = (sig: string) => {
      logger.info({ signal: sig }, 'signal received');
      resolve();
    };
    process.once('SIGTERM', () => onSignal('SIGTERM'));
    process.once('SIGINT', () => onSignal('SIGINT'));
  });
  // Hard bound on shutdown: whatever hangs, the process is gone within 10 s.
  const killer = setTimeout(() => {
    logger.error('shutdown took longer than 10 s; exiting');
    process.exit(1);
  }, 10_000);
  killer.unref();
  abort.abort();
  await simulation;
  await daemon.stop('signal');
  await http.close();
  await demo?.broker.close();
  await flushLogger(logger);
  return EXIT_OK;
};

function flushLogger(logger: Logger): Promise<void> {
  return new Promise((r) => logger.flush(() => r()));
}

/**
 * Start failures that a restart cannot cure, only the operator: a secret file readable by others or
 * missing, a calibration file or field log that is missing or invalid. They exit 2 like a configuration
 * error, so the systemd unit (RestartPreventExitStatus=2) does not restart into the same failure.
 */
const OPERATOR_FIX = new Set([
  'REEFD_SECRET_PERMISSIONS',
  'REEFD_SECRET_MISSING',
  'REEFD_CALIBRATION_INVALID',
  'REEFD_LOGBOOK_INVALID',
  'REEFD_INPUT_MISSING',
]);
function isOperatorFix(err: unknown): boolean {
  const code = (err as { code?: unknown } | null)?.code;
  return typeof code === 'string' && OPERATOR_FIX.has(code);
}
