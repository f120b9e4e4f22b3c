// A shore processor member as its own process (benchmarks, tests, and a deployment's process manager):
//   tsx services/scaleout/shore-main.ts --brokers H:P[,H:P] --topic RAW --group ID \
//     (--state-dir DIR | --state-topic RAW.state) \
//     --site FILE [--site FILE ...] [--snapshot-ms N] [--out FILE.ndjson] [--hold]
// Prints one JSON status line to stdout every 100 ms ({t, cpuMs, assigned, positions, stats}); with --hold it
// processes nothing until a line `go` arrives on stdin. SIGTERM stores the state and leaves the group.
import { appendFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import pino from 'pino';
import { createShoreMember } from './shore.js';
import { loadShoreSites } from './shore-sites.js';
import { createKafkaStateStore } from './kafka-state-store.js';
import { createDirectoryStateStore } from './state-store.js';

const { values } = parseArgs({
  options: {
    brokers: { type: 'string' },
    topic: { type: 'string' },
    group: { type: 'string' },
    'state-dir': { type: 'string' },
    'state-topic': { type: 'string' },
    site: { type: 'string', multiple: true },
    'snapshot-ms': { type: 'string' },
    out: { type: 'string' },
    hold: { type: 'boolean', default: false },
  },
});
const need = (v: string | undefined, name: string): string => {
  if (v === undefined || v === '') {
    process.stderr.write(`REEFD_USAGE: --${name} is required\n`);
    process.exit(2);
  }
  return v;
};

const logger = pino({ level: process.env.REEFD_LOG_LEVEL ?? 'warn' }, pino.destination(2));
const brokers = need(values.brokers, 'brokers').split(',');
const store =
  values['state-topic'] !== undefined
    ? await createKafkaStateStore({ brokers, clientId: 'reefd-shore', topic: values['state-topic'], logger })
    : createDirectoryStateStore(need(values['state-dir'], 'state-dir'));
const { sites, processorOptions } = await loadShoreSites(values.site ?? []);
let go: () => void = () => undefined;
const started = values.hold ? new Promise<void>((r) => (go = r)) : Promise.resolve();
let running = !values.hold;
void started.then(() => (running = true));
process.stdin.on('data', (d: Buffer) => {
  if (d.toString().includes('go')) go();
});
let out: string[] = [];
const member = createShoreMember({
  sites,
  processorOptions,
  brokers,
  clientId: 'reefd-shore',
  groupId: need(values.group, 'group'),
  topic: need(values.topic, 'topic'),
  store,
  snapshotEveryMs: Number(values['snapshot-ms'] ?? 10_000),
  onRecords: (records) => {
    if (values.out !== undefined) for (const r of records) out.push(JSON.stringify(r));
  },
  flushOutputs: async () => {
    if (values.out === undefined || out.length === 0) return;
    const lines = out;
    out = [];
    await appendFile(values.out, lines.join('\n') + '\n');
  },
  logger,
  pace: () => (running ? undefined : started),
});
await member.start();
const timer = setInterval(() => {
  const positions = Object.fromEntries([...member.positions()].map(([p, o]) => [p, o.toString()]));
  process.stdout.write(
    JSON.stringify({
      t: Date.now(),
      cpuMs: (process.cpuUsage().user + process.cpuUsage().system) / 1000,
      assigned: member.assigned(),
      positions,
      stats: member.stats(),
    }) + '\n',
  );
}, 100);
process.on('SIGTERM', () => {
  clearInterval(timer);
  go();
  void member.stop().then(() => process.exit(0));
});
