// docs/contract-v1.md is the product's outside for users of this repository; it must stay the contract that
// the outside checks hold us to (../shared/contract.md, beside the checkout on the project's machines).
import { existsSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

const ours = readFileSync(new URL('../../docs/contract-v1.md', import.meta.url), 'utf8');
const shared = new URL('../../../shared/contract.md', import.meta.url);

describe('contract document', () => {
  it('names every message kind, record type and command of v1', () => {
    for (const k of ['ctd', 'oxygen', 'pco2', 'pressure', 'adcp', 'par', 'met', 'sample'])
      expect(ours).toContain(`| \`${k}\` |`);
    for (const t of ['waves', 'current', 'carbonate', 'oxygen', 'flux', 'alert'])
      expect(ours).toContain(`| \`${t}\` |`);
    for (const c of ['reefd run', 'reefd replay', 'reefd config check', 'reefd carbonate', 'reefd simulate'])
      expect(ours).toContain(c);
  });
  it.runIf(existsSync(shared))('is the same text as the shared contract', () => {
    expect(ours).toBe(readFileSync(shared, 'utf8'));
  });
});
