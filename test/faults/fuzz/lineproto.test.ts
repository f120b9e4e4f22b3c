// Fuzzing the line-protocol encoder (libs/lineproto) with hostile strings: what it writes always reads back
// per the line-protocol reference (./lp-parse.ts).
import fc from 'fast-check';
import { describe, it } from 'vitest';
import type { DerivedRecord } from '../../../libs/contract/index.js';
import { fuzz, fuzzTimeoutMs } from './harness.js';
import { lineProperty, recordProperty, type LineInput } from './properties.js';

const nasty = fc.constantFrom(
  ' ',
  ',',
  '=',
  '"',
  '\\',
  '\n',
  '\r',
  '\t',
  '\u0000',
  '#',
  '\\ ',
  '\\,',
  'é',
  '\u2028',
  '\ud83c\udf0a',
);
const hostile = fc.oneof(
  fc.string({ minLength: 1, maxLength: 20 }),
  fc
    .array(fc.oneof(nasty, fc.string({ maxLength: 3 })), { minLength: 1, maxLength: 10 })
    .map((a) => a.join('')),
);
/** Names line protocol can carry: non-empty, not starting with '#' (a comment), not only spaces at the start. */
const name = fc.tuple(fc.constantFrom('a', 'Z', '_', '0'), hostile).map(([a, b]) => a + b);
const field = fc.tuple(
  name,
  fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer(), fc.boolean(), hostile),
);

const input: fc.Arbitrary<LineInput> = fc.record({
  dialect: fc.constantFrom('v1' as const, 'v2' as const),
  measurement: name,
  site: name,
  station: name,
  fields: fc.uniqueArray(field, { minLength: 1, maxLength: 6, selector: ([k]) => k }),
  timeMs: fc.integer({ min: 0, max: 4_102_444_800_000 }),
});

describe('fuzz: line protocol', () => {
  it(
    'formatPoint output reads back exactly, for hostile names, tags and strings',
    () => {
      fuzz('lineproto', input, lineProperty);
    },
    fuzzTimeoutMs(),
  );

  it(
    'recordToLine refuses or writes a readable line for records with hostile strings',
    () => {
      fuzz(
        'lineproto-record',
        fc.record({
          dialect: fc.constantFrom('v1' as const, 'v2' as const),
          site: name,
          station: name,
          t: fc.oneof(
            fc.date({ noInvalidDate: true }).map((d) => d.toISOString()),
            fc.string(),
          ),
          note: hostile,
          value: fc.double(),
        }),
        ({ dialect, ...r }) => recordProperty({ type: 'oxygen', ...r } as unknown as DerivedRecord, dialect),
      );
    },
    fuzzTimeoutMs(),
  );
});
