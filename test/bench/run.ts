// `npm run bench`: runs every named scenario test/bench/<name>.bench.ts in turn, each in its own process
// (so one scenario's JIT and heap do not colour the next), or only those named on the command line.
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

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
let failed = 0;
for (const name of scenarios) {
  console.log(`\n=== bench: ${name} ===`);
  const r = spawnSync(
    process.execPath,
    ['--import', 'tsx', '--expose-gc', path.join(here, `${name}.bench.ts`)],
    {
      stdio: 'inherit',
      env: process.env,
    },
  );
  if (r.status !== 0) {
    failed++;
    console.log(`=== bench: ${name} FAILED (exit ${r.status}) ===`);
  }
}
console.log(`\n${scenarios.length - failed} of ${scenarios.length} scenarios ran`);
process.exit(failed === 0 ? 0 : 1);
