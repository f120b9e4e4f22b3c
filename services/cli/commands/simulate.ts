// `reefd simulate`: publishes the fictional reef of a configuration to an MQTT broker (libs/simulator).
import { parseArgs } from 'node:util';
import { loadConfigOrThrow } from '../../config/load.js';
import { createLogger, LOG_LEVELS } from '../../log/logger.js';
import { publishSimulation } from '../../simulator/publisher.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd simulate --config FILE [options]

Publishes the simulated sensor network of the site in FILE (for the demo,
deploy/demo/ornen-reef.yaml) as contract messages to an MQTT broker.

Options:
  --config FILE      site configuration (required)
  --broker URL       MQTT broker (default mqtt://127.0.0.1:1883)
  --speed X          simulated seconds per wall second (default 1; 60 = an hour a minute;
                     "max" = as fast as the broker acknowledges)
  --seed N           random seed; the same seed gives the same data (default 1)
  --start ISO        simulated start time (default: now at --speed 1; otherwise a day back, or
                     --duration back with "max", so the fast part ends at the wall clock)
  --duration H       simulated hours (default: 48 with --speed max, else 8760)
  --truth FILE       write the model's truth as NDJSON beside the messages
  --log-level LEVEL  ${LOG_LEVELS.join('|')} (default info)
`;

interface SimulateOptions {
  configPath: string;
  broker: string | undefined;
  truth: string | undefined;
  speed: number | 'max';
  seed: number;
  startMs: number;
  hours: number;
  level: (typeof LOG_LEVELS)[number];
}

export const run: CommandRun = async (args, io) => {
  const opts = parseOptions(args, io);
  if (typeof opts === 'number') return opts;
  let config;
  try {
    config = await loadConfigOrThrow(opts.configPath);
  } catch (err) {
    io.stderr(`reefd simulate: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
  const logger = createLogger({ level: opts.level, pretty: io.isTty });
  const abort = new AbortController();
  const stop = () => abort.abort();
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
  try {
    const s = await publishSimulation({
      config,
      brokerUrl: opts.broker ?? 'mqtt://127.0.0.1:1883',
      speed: opts.speed,
      seed: opts.seed,
      startMs: opts.startMs,
      durationMs: opts.hours * 3.6e6,
      notAheadOfWallClock: true,
      ...(opts.truth ? { truthPath: opts.truth } : {}),
      logger,
      signal: abort.signal,
    });
    io.stderr(
      `reefd simulate: published ${s.messages} messages up to ${new Date(s.lastTMs).toISOString()}${s.aborted ? ' (stopped)' : ''}\n`,
    );
    return EXIT_OK;
  } catch (err) {
    io.stderr(`reefd simulate: ${(err as Error).message}\n`);
    return EXIT_FAILURE;
  } finally {
    process.off('SIGINT', stop);
    process.off('SIGTERM', stop);
  }
};

/** The options, checked (every problem said at once), or the exit code after the help or the problems. */
function parseOptions(args: string[], io: CliIo): SimulateOptions | number {
  const values = parseValues(args, io);
  if (typeof values === 'number') return values;
  const problems: string[] = [];
  if (!values.config) problems.push('--config FILE is required');
  const speed = values.speed === undefined ? 1 : values.speed === 'max' ? 'max' : Number(values.speed);
  if (speed !== 'max' && !(Number.isFinite(speed) && speed > 0))
    problems.push('--speed must be a positive number or "max"');
  const seed = values.seed === undefined ? 1 : Number(values.seed);
  if (!Number.isInteger(seed)) problems.push('--seed must be an integer');
  const hours = values.duration === undefined ? (speed === 'max' ? 48 : 8760) : Number(values.duration);
  // A sample is never sent before its time (a daemon's timing test would reject it as a clock fault), so a
  // fast run starts in the past and plays fast until it reaches the wall clock, then in real time.
  const nowMin = Math.floor(Date.now() / 60_000) * 60_000;
  const startMs =
    values.start !== undefined
      ? Date.parse(values.start)
      : speed === 1
        ? nowMin
        : nowMin - (speed === 'max' ? hours : 24) * 3.6e6;
  if (!Number.isFinite(startMs)) problems.push('--start must be an ISO 8601 time, e.g. 2026-03-01T00:00:00Z');
  if (!(Number.isFinite(hours) && hours > 0)) problems.push('--duration must be a positive number of hours');
  const level = values['log-level'] ?? 'info';
  if (!(LOG_LEVELS as readonly string[]).includes(level))
    problems.push(`--log-level must be one of ${LOG_LEVELS.join(', ')}`);
  if (problems.length > 0) {
    io.stderr(problems.map((p) => `reefd simulate: ${p}\n`).join('') + `\n${HELP}`);
    return EXIT_USAGE;
  }
  return {
    configPath: values.config as string,
    broker: values.broker,
    truth: values.truth,
    speed,
    seed,
    startMs,
    hours,
    level: level as (typeof LOG_LEVELS)[number],
  };
}

/** The options as given, or the exit code after the help or a parse error. */
function parseValues(args: string[], io: CliIo) {
  let values;
  try {
    ({ values } = parseArgs({
      args,
      strict: true,
      options: {
        help: { type: 'boolean', short: 'h' },
        config: { type: 'string' },
        broker: { type: 'string' },
        speed: { type: 'string' },
        seed: { type: 'string' },
        start: { type: 'string' },
        duration: { type: 'string' },
        truth: { type: 'string' },
        'log-level': { type: 'string' },
      },
    }));
  } catch (err) {
    io.stderr(`reefd simulate: ${(err as Error).message}\n\n${HELP}`);
    return EXIT_USAGE;
  }
  if (values.help) {
    io.stdout(HELP);
    return EXIT_OK;
  }
  return values;
}
