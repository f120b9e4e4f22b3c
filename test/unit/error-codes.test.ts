// One guard for every error code of reefd (DEVELOPERS.md, conventions): each REEFD_ code the code of libs/
// and services/ uses is in exactly one catalogue built with defineErrors, each catalogued code is used, and
// docs/errors.md lists every code of every catalogue as the catalogues say.
// Regenerate the page after changing a catalogue:
//   REEFD_WRITE_ERRORS_DOC=1 npx vitest run test/unit/error-codes.test.ts   (then read its git diff)
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { ErrorCatalogue } from '../../libs/contract/index.js';
import {
  codesInSources,
  loadCatalogues,
  packagesWithErrors,
  renderErrorsDoc,
  ROOT,
} from './error-codes-doc.js';

const DOC = join(ROOT, 'docs', 'errors.md');

// Catalogued codes no code raises yet, each with why it stays (a code is never reused, so it is kept).
const RESERVED: Record<string, string> = {
  REEFD_CARBONATE_NO_SOLUTION: 'the core name of what libs/carbonate returns as REEFD_CARBONATE_NO_ROOT',
  REEFD_NOT_BUILT: 'for commands a build leaves out; every command is built today',
  REEFD_SOURCE_UNAVAILABLE: 'sources retry a lost broker silently; the code is kept for their warnings',
};

let cats: Map<string, ErrorCatalogue<string>[]>;
let owners: Map<string, string>;
beforeAll(async () => {
  cats = await loadCatalogues();
  owners = new Map();
  for (const [pkg, list] of cats)
    for (const c of list) for (const code of c.codes) owners.set(code, owners.has(code) ? 'twice' : pkg);
});

describe('error codes across libs/ and services/', () => {
  it('each errors.ts exports one catalogue built with defineErrors, owned by its own folder', () => {
    expect(packagesWithErrors().length).toBeGreaterThanOrEqual(18);
    for (const [pkg, list] of cats) {
      expect(
        list.map((c) => c.owner),
        pkg,
      ).toEqual([pkg]);
      expect(list[0]!.codes.length, pkg).toBeGreaterThan(0);
    }
  });

  it('no code is in two catalogues', () => {
    const twice = [...owners].filter(([, o]) => o === 'twice').map(([c]) => c);
    expect(twice).toEqual([]);
  });

  it('every code the code uses is in a catalogue', () => {
    const used = codesInSources();
    expect(used.size).toBeGreaterThan(60);
    const stray = [...used]
      .filter(([code]) => !owners.has(code))
      .map(([code, files]) => `${code} in ${files[0]}`);
    expect(stray).toEqual([]);
  });

  it('every catalogued code is used outside its catalogue, or reserved with a reason', () => {
    const used = codesInSources();
    const idle = [...owners.keys()].filter(
      (code) => !(used.get(code) ?? []).some((f) => !f.endsWith('/errors.ts')) && !(code in RESERVED),
    );
    expect(idle).toEqual([]);
    for (const code of Object.keys(RESERVED)) expect(owners.has(code), code).toBe(true);
  });

  it('every text says what is wrong and how to fix it', () => {
    for (const list of cats.values())
      for (const c of list)
        for (const code of c.codes) expect(c.text(code).length, code).toBeGreaterThanOrEqual(30);
  });

  it('docs/errors.md lists every code of every catalogue, as the catalogues say', () => {
    const want = renderErrorsDoc(cats);
    if (process.env.REEFD_WRITE_ERRORS_DOC === '1') writeFileSync(DOC, want);
    const doc = readFileSync(DOC, 'utf8');
    const documented = [...doc.matchAll(/^\| `(REEFD_[A-Z0-9_]+)` \|/gm)].map((m) => m[1]);
    expect(documented.sort()).toEqual([...owners.keys()].sort());
    expect(doc, 'docs/errors.md is stale: regenerate it (see the head of this file)').toBe(want);
  });
});
