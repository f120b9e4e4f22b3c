import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { METABOLISM_ERRORS, MetabolismError, makeTransectParams } from './index.js';

describe('error catalogue', () => {
  const readme = readFileSync(new URL('./README.md', import.meta.url), 'utf8');

  it.each([...METABOLISM_ERRORS.codes])('%s is documented in README.md', (code) => {
    expect(readme).toMatch(new RegExp(`\\| \`${code}\` \\|`));
  });

  it('every documented code exists', () => {
    const documented = [...readme.matchAll(/\| `(REEFD_METABOLISM_[A-Z_]+)` \|/g)].map((m) => m[1]);
    expect(documented.sort()).toEqual([...METABOLISM_ERRORS.codes].sort());
  });

  it('bad transect parameters throw with the code, the value and a hint', () => {
    let err: unknown;
    try {
      makeTransectParams({ lengthM: -5, bearingDeg: 270 });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(MetabolismError);
    expect((err as MetabolismError).code).toBe('REEFD_METABOLISM_BAD_PARAMS');
    expect((err as MetabolismError).message).toContain('lengthM = -5');
    expect((err as MetabolismError).message).toContain('fix the transect configuration');
    expect(() => makeTransectParams({ lengthM: 300, bearingDeg: 270, maxAngleDeg: 50 })).toThrow(
      /suspectAngleDeg/,
    );
    expect(makeTransectParams({ lengthM: 300, bearingDeg: 270 }).minSpeedMS).toBe(0.02);
  });
});
