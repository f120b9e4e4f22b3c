import { describe, it, expect } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ALERTS_ERRORS } from './index.js';

describe('error catalogue of libs/alerts', () => {
  const here = import.meta.dirname;
  it('lists exactly the codes the package source uses, and the README documents each', () => {
    const used = new Set<string>();
    for (const f of readdirSync(here).filter(
      (x) => x.endsWith('.ts') && !x.endsWith('.test.ts') && x !== 'errors.ts',
    )) {
      for (const m of readFileSync(join(here, f), 'utf8').matchAll(/REEFD_[A-Z]+_[A-Z_]+/g)) used.add(m[0]);
    }
    expect([...used].sort()).toEqual([...ALERTS_ERRORS.codes].sort());
    const readme = readFileSync(join(here, 'README.md'), 'utf8');
    for (const code of [...ALERTS_ERRORS.codes]) expect(readme).toContain(`\`${code}\``);
  });
});
