import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CARBONATE_ERRORS } from './index.js';

describe('carbonate error catalogue', () => {
  const dir = new URL('.', import.meta.url);
  const sources = readdirSync(dir, { recursive: true })
    .map(String)
    .filter((f) => f.endsWith('.ts') && !f.endsWith('.test.ts') && f !== 'errors.ts')
    .map((f) => readFileSync(new URL(f, dir), 'utf8'))
    .join('\n');
  it('every code used in the library is in the catalogue with a fix', () => {
    const used = new Set(sources.match(/REEFD_CARBONATE_[A-Z_]+/g) ?? []);
    expect(used.size).toBeGreaterThan(3);
    for (const code of used) expect(CARBONATE_ERRORS.codes).toContain(code);
  });
  it('every catalogued code is declared or used in the code', () => {
    for (const code of CARBONATE_ERRORS.codes) expect(sources).toContain(code);
    for (const code of CARBONATE_ERRORS.codes) expect(CARBONATE_ERRORS.text(code).length).toBeGreaterThan(40);
  });
});
