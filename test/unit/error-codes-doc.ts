// Helpers of test/unit/error-codes.test.ts: the catalogues of every package (found by their errors.ts), the
// REEFD_ codes the code uses, and docs/errors.md as it follows from the catalogues.
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { isErrorCatalogue, type ErrorCatalogue } from '../../libs/contract/index.js';

export const ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const TOPS = ['libs', 'services'] as const;

/** Every package folder that has an errors.ts (libs/qc, services/notifiers, ...). */
export function packagesWithErrors(): string[] {
  const out: string[] = [];
  for (const top of TOPS)
    for (const d of readdirSync(join(ROOT, top), { withFileTypes: true }))
      if (d.isDirectory() && existsSync(join(ROOT, top, d.name, 'errors.ts'))) out.push(`${top}/${d.name}`);
  return out.sort();
}

/** The catalogues each package's errors.ts exports (by isErrorCatalogue), keyed by package folder. */
export async function loadCatalogues(): Promise<Map<string, ErrorCatalogue<string>[]>> {
  const out = new Map<string, ErrorCatalogue<string>[]>();
  for (const pkg of packagesWithErrors()) {
    const mod = (await import(join(ROOT, pkg, 'errors.ts'))) as Record<string, unknown>;
    out.set(pkg, Object.values(mod).filter(isErrorCatalogue));
  }
  return out;
}

function* sourceFiles(dir: string): Generator<string> {
  for (const d of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, d.name);
    if (d.isDirectory()) {
      if (d.name !== 'node_modules' && d.name !== 'vendor' && d.name !== 'testdata') yield* sourceFiles(p);
    } else if (/\.ts$/.test(d.name) && !/\.test\.ts$/.test(d.name)) yield p;
  }
}

// A code as the code writes it: REEFD_ and words of capitals and digits (a family named in prose,
// `REEFD_CURRENTS_*`, does not match). Names the file reads as environment variables are left out.
const CODE_IN_SOURCE = /\bREEFD_[A-Z0-9]+(?:_[A-Z0-9]+)*\b/g;
const ENV_USE = /env(?:\.|\[['"])(REEFD_[A-Z0-9_]+)/g;

/** Each code used in a (non-test) source file of libs/ and services/, with the files that use it. */
export function codesInSources(): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const top of TOPS)
    for (const f of sourceFiles(join(ROOT, top))) {
      const text = readFileSync(f, 'utf8');
      const env = new Set([...text.matchAll(ENV_USE)].map((m) => m[1]));
      for (const m of text.matchAll(CODE_IN_SOURCE)) {
        if (env.has(m[0])) continue;
        const files = out.get(m[0]) ?? [];
        const rel = relative(ROOT, f);
        if (!files.includes(rel)) files.push(rel);
        out.set(m[0], files);
      }
    }
  return out;
}

const escapeCell = (s: string) => s.replace(/\|/g, '\\|');

/** docs/errors.md as the catalogues make it. */
export function renderErrorsDoc(cats: Map<string, ErrorCatalogue<string>[]>): string {
  const lines = [
    '# Error codes',
    '',
    "<!-- Generated from the catalogues (each package's errors.ts, built with defineErrors in",
    '     libs/contract/errors.ts). Do not edit by hand: change the catalogue, then run',
    '     REEFD_WRITE_ERRORS_DOC=1 npx vitest run test/unit/error-codes.test.ts -->',
    '',
    'Every error reefd reports carries a stable code `REEFD_<AREA>_<WHAT>`: in the message it prints (the code',
    'first), in the `code` field of the error a library throws or a result it returns, in the `code` field of a',
    'log line and in the `error` field of an HTTP error answer. Codes are never reused for another meaning, so a',
    'script or a log search may select on them.',
    '',
    '"Retry" says whether trying the same step again can help (a network or disk that comes back); reefd retries',
    'those by itself, with backoff, and keeps the data meanwhile. The others need a change: of the configuration,',
    'the input, or (for those marked as a programming error) the calling code.',
    '',
    'The codes are grouped by the package that defines them.',
  ];
  for (const [pkg, list] of cats) {
    for (const cat of list) {
      lines.push('', `## ${pkg}`, '', '| Code | Retry | What is wrong and how to fix it |', '|---|---|---|');
      for (const code of cat.codes) {
        const e = cat.entries[code]!;
        lines.push(`| \`${code}\` | ${e.retriable ? 'yes' : 'no'} | ${escapeCell(e.text)} |`);
      }
    }
  }
  return lines.join('\n') + '\n';
}
