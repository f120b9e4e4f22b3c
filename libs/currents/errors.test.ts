import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CURRENT_FAILS, currentFail } from './errors.js';

describe('error catalogue', () => {
  const readme = readFileSync(new URL('./README.md', import.meta.url), 'utf8');

  it.each(Object.entries(CURRENT_FAILS))('%s is documented with its reason and flag', (code, e) => {
    expect(readme).toMatch(new RegExp(`\\| \`${code}\` \\| ${e.reason} \\| ${e.flag} \\|`));
  });

  it('failures carry the code, the reason, the flag and a hint on how to fix it', () => {
    const f = currentFail('REEFD_CURRENTS_TILT', 'total tilt 25.0 deg > 20 deg');
    expect(f).toMatchObject({ ok: false, flag: 4, code: 'REEFD_CURRENTS_TILT', reason: 'tilt' });
    expect(f.message).toContain('25.0 deg');
    expect(f.message).toContain('inspect the mooring');
  });
});
