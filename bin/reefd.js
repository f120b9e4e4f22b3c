#!/usr/bin/env node
// The reefd command: runs the compiled CLI (built by `npm ci` through the prepare script).
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const entry = new URL('../dist/services/cli/main.js', import.meta.url);
if (!existsSync(fileURLToPath(entry))) {
  console.error('reefd: the compiled CLI is missing; run `npm run build` (npm ci does it for you).');
  process.exit(2);
}
const { main } = await import(entry.href);
process.exitCode = await main(process.argv.slice(2));
