// `npm run bench`: runs every named scenario test/bench/<name>.bench.ts in turn, each in its own process
// (so one scenario's JIT and heap do not colour the next), or only those named on the command line, then
// prints one table with a row for every row of the performance goals (issue 17), each a ratio against a
// baseline the scenario measured in the same run. A row whose scenario did not run (not named, or failed)
// says so; a row whose code is not built yet prints the current measurement.
import { spawn } from 'node:child_process';
import { readdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { ROW_TAG, type SummaryRow } from './lib/measure.js';

const here = path.dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const scenarios = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .map((f) => f.replace(/\.bench\.ts$/, ''))
  .filter((n) => wanted.length === 0 || wanted.includes(n))
  .sort();

if (scenarios.length === 0) {
  console.error(`no benchmark scenarios${wanted.length ? ` named ${wanted.join(', ')}` : ''} in ${here}`);
  process.exit(2);
}

/** The table's rows in the order of the goals, and the scenario that measures each. */
const TABLE: readonly { id: string; scenario: string; what: string }[] = [
  {
    id: 'intake',
    scenario: 'daemon',
    what: 'daemon intake / no-op mqtt.js subscriber, demo mix with bursts',
  },
  { id: 'intake-small', scenario: 'daemon', what: 'daemon intake / no-op mqtt.js subscriber, small CTD/O2' },
  { id: 'ack', scenario: 'ack', what: 'acknowledgement ceiling' },
  { id: 'latency', scenario: 'daemon', what: 'p99 record latency at 5,000 msg/s sustained' },
  { id: 'replay', scenario: 'replay', what: 'replay / parse-only baseline, one process' },
  { id: 'replay-sharded', scenario: 'replay', what: 'sharded replay / single process, 2 cores' },
  { id: 'burst', scenario: 'burst', what: 'one 2048-sample burst through the pipeline' },
  { id: 'rss', scenario: 'memory', what: 'peak RSS, 1,000 stations, dashboard on' },
  { id: 'stall', scenario: 'daemon', what: 'event-loop stall (longest /healthz seen from outside)' },
  { id: 'memory', scenario: 'memory', what: 'processor memory vs stations, GC share' },
];

async function runScenario(name: string, rows: SummaryRow[]): Promise<boolean> {
  console.log(`\n=== bench: ${name} ===`);
  const child = spawn(
    process.execPath,
    ['--import', 'tsx', '--expose-gc', path.join(here, `${name}.bench.ts`)],
    { stdio: ['ignore', 'pipe', 'inherit'], env: process.env },
  );
  const lines = createInterface({ input: child.stdout });
  lines.on('line', (line) => {
    if (line.startsWith(ROW_TAG)) rows.push(JSON.parse(line.slice(ROW_TAG.length)) as SummaryRow);
    else console.log(line);
  });
  const code = await new Promise<number | null>((resolve) => child.on('close', resolve));
  if (code !== 0) console.log(`=== bench: ${name} FAILED (exit ${code}) ===`);
  return code === 0;
}

const rows: SummaryRow[] = [];
const failed: string[] = [];
for (const name of scenarios) if (!(await runScenario(name, rows))) failed.push(name);

const cpu = os.cpus();
console.log(
  `\n=== summary (${new Date().toISOString().slice(0, 16)}Z, ${cpu.length} x ${cpu[0]?.model ?? 'cpu'}, ` +
    `Node ${process.version}, load average ${os.loadavg()[0]?.toFixed(1)}) ===`,
);
const cells = (r: string[]) => `| ${r.join(' | ')} |`;
console.log(cells(['what', 'baseline (same run)', 'measured', 'ratio', 'goal', 'met']));
console.log(cells(['---', '---', '---', '---', '---', '---']));
for (const t of TABLE) {
  const r = rows.find((x) => x.id === t.id);
  if (r === undefined) {
    const why = failed.includes(t.scenario)
      ? `scenario ${t.scenario} failed`
      : scenarios.includes(t.scenario)
        ? 'no row'
        : `not run (npm run bench ${t.scenario})`;
    console.log(cells([t.what, '-', why, '-', '-', '-']));
    continue;
  }
  const ratio = r.ratio === null || !Number.isFinite(r.ratio) ? '-' : r.ratio.toFixed(2);
  const met = r.met === 'n/a' ? 'n/a' : r.met ? 'yes' : 'no';
  console.log(cells([r.what, r.baseline, r.measured + (r.note ? ` (${r.note})` : ''), ratio, r.goal, met]));
}
const extra = rows.filter((r) => !TABLE.some((t) => t.id === r.id));
for (const r of extra)
  console.log(`also: ${r.what}: ${r.measured} against ${r.baseline} (ratio ${r.ratio.toFixed(2)})`);
console.log(`\n${scenarios.length - failed.length} of ${scenarios.length} scenarios ran`);
process.exit(failed.length === 0 ? 0 : 1);
