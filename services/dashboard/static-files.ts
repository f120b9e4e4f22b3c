// The dashboard's files: our own under static/, uPlot's dist files from node_modules (resolved from the
// package root at start-up, never copied into git). Only names known at start-up are served.
import { readdirSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { packageRoot } from '../paths.js';

export interface StaticFile {
  body: Buffer;
  type: string;
}

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
};

/** Route path -> file, read once. The files are small (tens of kB) and the set is fixed. */
export function loadStaticFiles(): Map<string, StaticFile> {
  const files = new Map<string, StaticFile>();
  // From the package root, so the same files serve from source (tsx) and from dist/.
  const dir = path.join(packageRoot(), 'services', 'dashboard', 'static');
  for (const name of readdirSync(dir)) {
    const type = TYPES[path.extname(name)];
    if (type === undefined) continue;
    files.set(`/${name}`, { body: readFileSync(path.join(dir, name)), type });
  }
  const index = files.get('/index.html');
  if (index) files.set('/', index);
  // uPlot's package entry lives in dist/, so its directory is the dist folder.
  const require = createRequire(import.meta.url);
  const dist = path.dirname(require.resolve('uplot'));
  files.set('/vendor/uplot.min.js', {
    body: readFileSync(path.join(dist, 'uPlot.iife.min.js')),
    type: TYPES['.js'] as string,
  });
  files.set('/vendor/uplot.min.css', {
    body: readFileSync(path.join(dist, 'uPlot.min.css')),
    type: TYPES['.css'] as string,
  });
  return files;
}
