// Finds the package root at run time, whether running from source (tests, tsx) or from dist/.
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

let cached: string | undefined;

export function packageRoot(): string {
  if (cached !== undefined) return cached;
  let dir = path.dirname(fileURLToPath(import.meta.url));
  for (;;) {
    const pkg = path.join(dir, 'package.json');
    if (existsSync(pkg) && (JSON.parse(readFileSync(pkg, 'utf8')) as { name?: string }).name === 'reefd') {
      cached = dir;
      return dir;
    }
    const up = path.dirname(dir);
    if (up === dir) throw new Error('reefd package root not found above ' + fileURLToPath(import.meta.url));
    dir = up;
  }
}
