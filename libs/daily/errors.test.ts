import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DAILY_ERRORS, DailyError, createLocalCalendar } from './index.js';

describe('error catalogue', () => {
  const readme = readFileSync(new URL('./README.md', import.meta.url), 'utf8');

  it.each([...DAILY_ERRORS.codes])('%s is documented in README.md', (code) => {
    expect(readme).toMatch(new RegExp(`\\| \`${code}\` \\|`));
  });

  it('every documented code exists', () => {
    const documented = [...readme.matchAll(/\| `(REEFD_DAILY_[A-Z_]+)` \|/g)].map((m) => m[1]);
    expect(documented.sort()).toEqual([...DAILY_ERRORS.codes].sort());
  });

  it('a bad zone throws with the code, the value and a hint', () => {
    let err: unknown;
    try {
      createLocalCalendar('Mars/Olympus');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(DailyError);
    expect((err as DailyError).code).toBe('REEFD_DAILY_BAD_TIMEZONE');
    expect((err as DailyError).message).toContain('"Mars/Olympus"');
    expect((err as DailyError).message).toContain('Pacific/Majuro or UTC');
  });
});
