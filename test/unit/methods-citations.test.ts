// Every citation of the methods documentation in the code points at a section that exists, on the page of
// that section's number (docs/methods/README.md, "How to cite"), and nothing cites a document outside the
// repository instead.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = new URL('../../', import.meta.url).pathname;
const METHODS = path.join(ROOT, 'docs/methods');
const SKIP = new Set(['node_modules', 'dist', 'coverage', '.venv', '.cache', '.git', 'vendor', 'vectors']);
const THIS = 'test/unit/methods-citations.test.ts';

function* files(dir: string): Generator<string> {
  for (const name of readdirSync(dir)) {
    if (SKIP.has(name)) continue;
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) yield* files(p);
    else if (/\.(ts|js|py|sh|md|yaml)$/.test(name)) yield p;
  }
}

const sources = ['libs', 'services', 'test', 'bin', 'deploy']
  .flatMap((d) => [...files(path.join(ROOT, d))])
  .concat(['README.md', 'DEVELOPERS.md', 'eslint.config.js'].map((f) => path.join(ROOT, f)))
  .map((p) => ({ rel: path.relative(ROOT, p), text: readFileSync(p, 'utf8') }));

/** Section numbers of each page: "1", "1.5", ... from its headings; the page's own number first. */
const pages = new Map<string, string[]>();
for (const name of readdirSync(METHODS).filter((f) => f.endsWith('.md') && f !== 'README.md')) {
  const text = readFileSync(path.join(METHODS, name), 'utf8');
  const numbers = [...text.matchAll(/^#{1,4} (\d+(?:\.\d+)?)\.? /gm)].map((m) => m[1] as string);
  pages.set(name, numbers);
}

// `docs/methods/<page>.md` (optionally in backticks), then numbers and ranges joined by ", " or "-".
const CITE =
  /docs\/methods\/([a-z][a-z0-9-]*\.md)`?((?:\s+|,\s*|-)\d+(?:\.\d+)?(?:(?:-|,\s*)\d+(?:\.\d+)?)*)?/g;

describe('citations of docs/methods', () => {
  const cites = sources.flatMap(({ rel, text }) =>
    [...text.matchAll(CITE)].map((m) => ({
      where: `${rel}:${text.slice(0, m.index).split('\n').length}`,
      page: m[1] as string,
      numbers: (m[2] ?? '').split(/[\s,-]+/).filter((n) => n !== ''),
    })),
  );

  it('every page has a numbered top heading and numbered sections', () => {
    expect(pages.size).toBeGreaterThanOrEqual(9);
    for (const [page, numbers] of pages) {
      expect(numbers[0], `${page}: "# N. Title" first`).toMatch(/^\d+$/);
      for (const n of numbers.slice(1)) expect(n.split('.')[0], `${page} section ${n}`).toBe(numbers[0]);
    }
  });

  it('every cited page exists and every cited section is a heading of that page', () => {
    expect(cites.length).toBeGreaterThan(200);
    let numbered = 0;
    for (const c of cites) {
      const numbers = pages.get(c.page);
      expect(numbers, `${c.where}: docs/methods/${c.page} does not exist`).toBeDefined();
      for (const n of c.numbers) {
        expect(numbers, `${c.where}: ${c.page} has no section ${n}`).toContain(n);
        numbered++;
      }
    }
    expect(numbered).toBeGreaterThan(150);
  });

  it('nothing cites a document outside the repository', () => {
    const outside = /science\.md|science spec|\.\.\/shared\/|(?<![\w-])contract\.md|contract-ext\.md/;
    const offenders = sources
      .filter((s) => s.rel !== THIS)
      .flatMap(({ rel, text }) =>
        text
          .split('\n')
          .map((l, i) => [`${rel}:${i + 1}`, l] as const)
          .filter(([, l]) => outside.test(l)),
      );
    expect(offenders).toEqual([]);
  });
});
