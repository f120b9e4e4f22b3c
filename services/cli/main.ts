// The reefd command line: `reefd <command> [options]`. Each command lives in commands/<name>.ts.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { packageRoot } from '../paths.js';
import { EXIT_OK, EXIT_USAGE, type CliIo, type CommandRun } from './io.js';

interface CommandEntry {
  summary: string;
  load: () => Promise<{ run: CommandRun }>;
}

export const COMMANDS: Record<string, CommandEntry> = {
  run: {
    summary: 'run the daemon (no --config: the built-in demo)',
    load: () => import('./commands/run.js'),
  },
  replay: {
    summary: 'reprocess a raw archive into derived records (NDJSON)',
    load: () => import('./commands/replay.js'),
  },
  config: {
    summary: 'validate a configuration file (config check FILE) or print its JSON Schema (config schema)',
    load: () => import('./commands/config.js'),
  },
  carbonate: {
    summary: 'solve the seawater carbonate system once',
    load: () => import('./commands/carbonate.js'),
  },
  simulate: {
    summary: 'publish the fictional demo reef to a broker',
    load: () => import('./commands/simulate.js'),
  },
  alerts: {
    summary: 'list or acknowledge alerts (alerts list|ack ID)',
    load: () => import('./commands/alerts.js'),
  },
  shore: {
    summary: 'a shore processor member of a Kafka consumer group (scale-out)',
    load: () => import('./commands/shore.js'),
  },
  doctor: { summary: 'check a live install and say what to fix', load: () => import('./commands/doctor.js') },
  calibrate: {
    summary: 'fit sensor corrections from the bottles in an archive',
    load: () => import('./commands/calibrate.js'),
  },
  export: {
    summary: 'derived records to CSV or CF NetCDF files',
    load: () => import('./commands/export.js'),
  },
  samples: {
    summary: 'import lab results into the raw archive (samples import)',
    load: () => import('./commands/samples.js'),
  },
  logbook: {
    summary: 'add to or list the field log (logbook add|list)',
    load: () => import('./commands/logbook.js'),
  },
};

export function version(): string {
  const pkg = JSON.parse(readFileSync(path.join(packageRoot(), 'package.json'), 'utf8')) as {
    version: string;
  };
  return pkg.version;
}

function usage(): string {
  const width = Math.max(...Object.keys(COMMANDS).map((k) => k.length));
  const lines = Object.entries(COMMANDS).map(([k, c]) => `  ${k.padEnd(width)}  ${c.summary}`);
  return `Usage: reefd <command> [options]

reefd watches an instrumented coral reef: it checks every sensor value, derives waves, currents,
the carbonate system and community metabolism, stores them and raises alerts.

Commands:
${lines.join('\n')}

Global options:
  --help, -h            help for reefd or a command (reefd <command> --help)
  --version, -V         print the version
  --log-level LEVEL     fatal|error|warn|info|debug|trace|silent (default info)
`;
}

export function processIo(): CliIo {
  return {
    stdout: (s) => void process.stdout.write(s),
    stderr: (s) => void process.stderr.write(s),
    env: process.env,
    isTty: Boolean(process.stdout.isTTY),
  };
}

export async function main(argv: string[], io: CliIo = processIo()): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    io.stdout(usage());
    return name === undefined ? EXIT_USAGE : EXIT_OK;
  }
  if (name === '--version' || name === '-V') {
    io.stdout(`reefd ${version()}\n`);
    return EXIT_OK;
  }
  const entry = COMMANDS[name];
  if (entry === undefined) {
    io.stderr(`reefd: unknown command "${name}"\n\n${usage()}`);
    return EXIT_USAGE;
  }
  const mod = await entry.load();
  return mod.run(rest, io);
}
