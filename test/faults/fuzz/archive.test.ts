// Fuzzing the archive line parser (parseArchiveLine) and the archive reader (services/archive) on random
// bytes, truncated gzip and corrupted gzip.
import fc from 'fast-check';
import { afterAll, describe, it } from 'vitest';
import { archiveLine } from '../../../libs/contract/index.js';
import { fuzz, fuzzAsync, fuzzTimeoutMs } from './harness.js';
import { archiveLineProperty } from './properties.js';
import { readerCleanup, readerProperty, type ReaderInput } from './reader-property.js';

afterAll(readerCleanup);

const line = fc
  .tuple(fc.string({ maxLength: 30 }), fc.jsonValue({ maxDepth: 2 }), fc.option(fc.string({ maxLength: 20 })))
  .map(([t, msg, rej]) =>
    archiveLine(
      `reef/s/${t.replace(/\s/g, '_') || 'x'}/ctd/c`,
      '2026-12-01T00:00:00.000Z',
      JSON.stringify(msg),
      rej ?? undefined,
    ),
  );

describe('fuzz: archive', () => {
  it(
    'parseArchiveLine never throws on any text',
    () => {
      fuzz(
        'archive-line',
        fc.oneof(
          fc.string(),
          fc.string({ unit: 'binary' }),
          fc.json(),
          line,
          line.map((l) => l.slice(0, l.length - 3)),
        ),
        archiveLineProperty,
      );
    },
    fuzzTimeoutMs(),
  );

  it(
    'the reader survives random bytes, truncated and corrupted gzip',
    async () => {
      await fuzzAsync<ReaderInput>(
        'archive-reader',
        fc.oneof(
          fc.record({
            plainHex: fc.uint8Array({ maxLength: 2000 }).map((b) => Buffer.from(b).toString('hex')),
          }),
          fc.record({ lines: fc.array(line, { minLength: 1, maxLength: 200 }), cut: fc.nat() }),
          fc.record({ lines: fc.array(line, { minLength: 1, maxLength: 50 }), flip: fc.nat() }),
        ),
        readerProperty,
        4,
      );
    },
    fuzzTimeoutMs(),
  );
});
