// Replays every fixture kept under test/fixtures/fuzz/<target>/ (counterexamples the fuzzers found, plus
// hand-made seeds) through the same property the fuzzer checks. A fixture with a `known` field is a
// reported, still-open bug: it is replayed as an expected failure until fixed.
import { afterAll, describe, expect, it } from 'vitest';
import { fixtures } from './harness.js';
import { readerCleanup, readerProperty, type ReaderInput } from './reader-property.js';
import {
  archiveLineProperty,
  configProperty,
  lineProperty,
  messageProperty,
  type LineInput,
  type MessageInput,
} from './properties.js';

afterAll(readerCleanup);

const targets: Record<string, (input: never) => void | Promise<void>> = {
  message: (i: MessageInput) => messageProperty(i),
  'archive-line': (i: string) => archiveLineProperty(i),
  'archive-reader': (i: ReaderInput) => readerProperty(i),
  config: (i: string) => configProperty(i, false),
  lineproto: (i: LineInput) => lineProperty(i),
};

describe('fuzz regressions (test/fixtures/fuzz)', () => {
  it('has fixtures for every target', () => {
    for (const t of Object.keys(targets)) expect(fixtures(t).length).toBeGreaterThan(0);
  });
  for (const [target, property] of Object.entries(targets)) {
    for (const { file, fixture } of fixtures<never>(target)) {
      const known = (fixture as { known?: string }).known;
      const run = known !== undefined ? it.fails : it;
      run(`${target}/${file}: ${known ?? fixture.note}`, async () => {
        await property(fixture.input);
      });
    }
  }
});
