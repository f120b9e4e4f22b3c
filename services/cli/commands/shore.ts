// `reefd shore`: a processor member at the shore (scale-out over Kafka, deploy/SCALING.md). Members of one
// consumer group share the raw topic's partitions, one processor per site, with each site's state stored so
// that another member takes a partition over and resumes its windows. Records go to each site's own outputs.
import os from 'node:os';
import path from 'node:path';
import type { DerivedRecord, ReefdConfig } from '../../../libs/contract/index.js';
import type { ProcessorOptions } from '../../../libs/processor/index.js';
import { createOutputs } from '../../daemon/outputs.js';
import { createLogger, LOG_LEVELS, type Logger } from '../../log/logger.js';
import type { RecordSink } from '../../pipeline/types.js';
import { createKafkaStateStore } from '../../scaleout/kafka-state-store.js';
import { createShoreMember, type ShoreMember } from '../../scaleout/shore.js';
import { startShoreHttp, type ShoreHttp, type ShorePhase } from '../../scaleout/shore-http.js';
import { shoreKafkaSecurity, type ShoreKafkaSecurity } from '../../scaleout/shore-security.js';
import { loadShoreSites } from '../../scaleout/shore-sites.js';
import { createDirectoryStateStore } from '../../scaleout/state-store.js';
import { parseCommand } from '../args.js';
import { EXIT_FAILURE, EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from '../io.js';

const HELP = `Usage: reefd shore --brokers H:P[,H:P] --topic RAW --group ID --site FILE [--site FILE ...]
                   (--state-topic TOPIC | --state-dir DIR) [options]

Runs one processor member of a shore consumer group over the raw topic that edge stations fill
(\`bridge\` in their configuration). Each --site is an ordinary site configuration; its outputs
(database, Kafka, NDJSON) receive that site's derived records. The member's Kafka TLS files and SASL
credentials are those of the site files' sources.kafka (else bridge.kafka) sections; files that give
them must give the same ones.

Options:
  --state-topic T    compacted Kafka topic for the sites' processor state (e.g. RAW.state)
  --state-dir DIR    or a folder shared by the members
  --client-id ID     Kafka client id (default reefd-shore-<host>)
  --snapshot-s N     store state and commit offsets at most this often (default 10)
  --data DIR         folder for the outputs' spools (default ./reefd-data/shore)
  --http [HOST:]PORT serve /healthz and /metrics (HOST default 127.0.0.1)
  --log-level LEVEL  ${LOG_LEVELS.join('|')} (default info)
`;

interface ShoreOptions {
  brokers: string[];
  topic: string;
  group: string;
  sites: string[];
  stateTopic?: string;
  stateDir?: string;
  clientId: string;
  snapshotS: number;
  dataDir: string;
  level: (typeof LOG_LEVELS)[number];
  http?: { host: string; port: number };
}

export const run: CommandRun = async (args, io) => {
  const opts = parseOptions(args, io);
  if (typeof opts === 'number') return opts;
  const logger = createLogger({ level: opts.level, pretty: Boolean(process.stderr.isTTY) });
  const loaded = await loadSites(opts, io);
  if (typeof loaded === 'number') return loaded;
  const { sites, processorOptions, security } = loaded;
  const outputs = await createSiteOutputs(opts, sites, io.env, logger);
  const all = [...outputs.values()].flat();
  const { brokers, clientId } = opts;
  const store = opts.stateTopic
    ? await createKafkaStateStore({
        brokers,
        clientId: `${clientId}-state`,
        topic: opts.stateTopic,
        tls: security.tls,
        sasl: security.sasl,
        logger,
      })
    : createDirectoryStateStore(path.resolve(opts.stateDir as string));
  const member = createShoreMember({
    sites,
    processorOptions,
    brokers,
    clientId,
    tls: security.tls,
    sasl: security.sasl,
    groupId: opts.group,
    topic: opts.topic,
    store,
    snapshotEveryMs: opts.snapshotS * 1000,
    onRecords: (records: readonly DerivedRecord[], at) => {
      for (const s of outputs.get(at.site) ?? []) s.write(records);
    },
    flushOutputs: async () => {
      await Promise.all(all.map((s) => s.flush()));
    },
    logger,
  });
  let phase: ShorePhase = 'starting';
  const http = await serveHttp(opts, member, () => phase, logger);
  if (http === null) {
    await Promise.allSettled(all.map((s) => s.close()));
    return EXIT_USAGE;
  }
  try {
    await member.start();
  } catch (err) {
    logger.fatal({ err: (err as Error).message }, 'shore member could not join the group');
    await http?.close();
    return EXIT_FAILURE;
  }
  phase = 'running';
  logger.info(
    {
      group: opts.group,
      topic: opts.topic,
      sites: sites.map((s) => s.site),
      tls: security.tls !== undefined,
      sasl: security.sasl?.mechanism,
      kafkaSettingsFrom: security.from,
    },
    'shore member running',
  );
  await untilStopSignal();
  const killer = setTimeout(() => process.exit(1), 10_000);
  killer.unref();
  phase = 'stopping';
  await member.stop();
  await Promise.allSettled(all.map((s) => s.close()));
  await http?.close();
  return EXIT_OK;
};

/** The options, checked (every problem said at once), or the exit code. */
function parseOptions(args: string[], io: CliIo): ShoreOptions | number {
  const parsed = parseCommand(
    'shore',
    args,
    {
      brokers: { type: 'string' },
      topic: { type: 'string' },
      group: { type: 'string' },
      site: { type: 'string', multiple: true },
      'state-topic': { type: 'string' },
      'state-dir': { type: 'string' },
      'client-id': { type: 'string' },
      'snapshot-s': { type: 'string', default: '10' },
      data: { type: 'string' },
      http: { type: 'string' },
      'log-level': { type: 'string', default: 'info' },
    },
    HELP,
    io,
  );
  if (!parsed.ok) return parsed.exit;
  const v = parsed.values;
  const problems: string[] = [];
  if (!v.brokers) problems.push('--brokers is required');
  if (!v.topic) problems.push('--topic is required');
  if (!v.group) problems.push('--group is required');
  if (!v.site || v.site.length === 0) problems.push('at least one --site FILE is required');
  if (!v['state-topic'] === !v['state-dir'])
    problems.push('give exactly one of --state-topic and --state-dir');
  const snapshotS = Number(v['snapshot-s']);
  if (!(snapshotS > 0)) problems.push('--snapshot-s must be a positive number');
  const httpAt = v.http === undefined ? undefined : parseHostPort(v.http);
  if (httpAt === null) problems.push('--http takes PORT or HOST:PORT (port 0-65535)');
  const level = v['log-level'] as (typeof LOG_LEVELS)[number];
  if (!LOG_LEVELS.includes(level)) problems.push(`--log-level must be one of ${LOG_LEVELS.join(', ')}`);
  if (problems.length > 0) {
    io.stderr(`reefd shore: ${problems.join('; ')}\n\n${HELP}`);
    return EXIT_USAGE;
  }
  return {
    brokers: (v.brokers as string).split(',').map((b) => b.trim()),
    topic: v.topic as string,
    group: v.group as string,
    sites: v.site as string[],
    ...(v['state-topic'] ? { stateTopic: v['state-topic'] } : {}),
    ...(v['state-dir'] !== undefined ? { stateDir: v['state-dir'] } : {}),
    clientId: v['client-id'] ?? `reefd-shore-${os.hostname()}`,
    snapshotS,
    dataDir: path.resolve(v.data ?? path.join('reefd-data', 'shore')),
    level,
    ...(httpAt ? { http: httpAt } : {}),
  };
}

/** /healthz and /metrics when --http is given; null when its address cannot be bound (logged). */
async function serveHttp(
  opts: ShoreOptions,
  member: ShoreMember,
  phase: () => ShorePhase,
  logger: Logger,
): Promise<ShoreHttp | undefined | null> {
  if (opts.http === undefined) return undefined;
  try {
    const http = await startShoreHttp({ member, phase, ...opts.http });
    logger.info({ http: http.address }, 'shore member serves /healthz and /metrics');
    return http;
  } catch (err) {
    logger.fatal({ err: (err as Error).message, code: 'REEFD_USAGE' }, 'the --http address cannot be bound');
    return null;
  }
}

/** `PORT` or `HOST:PORT` (the host defaults to loopback); null when it is neither. */
export function parseHostPort(text: string): { host: string; port: number } | null {
  const m = /^(?:(.+):)?(\d{1,5})$/.exec(text.trim());
  const port = Number(m?.[2]);
  if (!m || !(port >= 0 && port <= 65535)) return null;
  return { host: m[1]?.replace(/^\[(.*)\]$/, '$1') ?? '127.0.0.1', port };
}

/** The site files, their field files, and the Kafka TLS and SASL they give; or the exit code. */
async function loadSites(
  opts: ShoreOptions,
  io: CliIo,
): Promise<
  | {
      sites: ReefdConfig[];
      processorOptions: Map<string, ProcessorOptions>;
      security: ShoreKafkaSecurity;
    }
  | number
> {
  try {
    const { sites, processorOptions } = await loadShoreSites(opts.sites);
    const security = await shoreKafkaSecurity(
      sites.map((config, i) => ({ config, file: opts.sites[i] as string })),
      io.env,
    );
    return { sites, processorOptions, security };
  } catch (err) {
    io.stderr(`reefd shore: ${(err as Error).message}\n`);
    return EXIT_USAGE;
  }
}

/** Each site's own outputs, configured from its file (relative paths beside it), spooling under --data. */
async function createSiteOutputs(
  opts: ShoreOptions,
  sites: readonly ReefdConfig[],
  env: CliIo['env'],
  logger: Logger,
): Promise<Map<string, RecordSink[]>> {
  const outputs = new Map<string, RecordSink[]>();
  for (const [i, cfg] of sites.entries()) {
    const file = opts.sites[i] as string;
    outputs.set(
      cfg.site,
      await createOutputs({
        config: cfg,
        baseDir: path.dirname(path.resolve(file)),
        dataDir: path.join(opts.dataDir, cfg.site),
        env,
        logger,
      }),
    );
  }
  return outputs;
}

function untilStopSignal(): Promise<void> {
  return new Promise<void>((resolve) => {
    process.once('SIGTERM', () => resolve());
    process.once('SIGINT', () => resolve());
  });
}
