import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { NETCDF_ERRORS } from './index.js';

describe('error catalogue', () => {
  it('lists exactly the codes the package source uses', () => {
    const dir = import.meta.dirname;
    const used = new Set<string>();
    for (const f of readdirSync(dir).filter(
      (x) => x.endsWith('.ts') && !x.endsWith('.test.ts') && x !== 'errors.ts',
    )) {
      for (const m of readFileSync(join(dir, f), 'utf8').matchAll(/REEFD_[A-Z_]+/g)) used.add(m[0]);
    }
    expect([...used].sort()).toEqual([...NETCDF_ERRORS.codes].sort());
  });
});
