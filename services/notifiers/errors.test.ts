import { describe, it, expect } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { NOTIFY_ERRORS } from './index.js';

describe('error catalogue of services/notifiers and reefd alerts', () => {
  const here = import.meta.dirname;
  it('lists exactly the codes the source uses, and libs/alerts/README.md documents each', () => {
    const files = readdirSync(here, { recursive: true, encoding: 'utf8' })
      .filter(
        (x) =>
          x.endsWith('.ts') && !x.endsWith('.test.ts') && x !== 'errors.ts' && !x.includes('test-helpers'),
      )
      .map((f) => join(here, f));
    files.push(join(here, '..', 'cli', 'commands', 'alerts.ts'));
    const used = new Set<string>();
    for (const f of files)
      for (const m of readFileSync(f, 'utf8').matchAll(/REEFD_[A-Z]+_[A-Z_]+/g)) used.add(m[0]);
    expect([...used].sort()).toEqual([...NOTIFY_ERRORS.codes].sort());
    const readme = readFileSync(join(here, '..', '..', 'libs', 'alerts', 'README.md'), 'utf8');
    for (const code of [...NOTIFY_ERRORS.codes]) expect(readme).toContain(`\`${code}\``);
  });
});
