// Reading a point's series and time back from the line reefd wrote (for looking the uncertain batch up).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatPoint } from '../../libs/lineproto/index.js';
import { seriesPoint } from './vm-presence.js';

// eslint-disable-next-line no-control-regex
const clean = (s: string) => s.replace(/[\u0000-\u001f\u007f]/g, ' ');

describe('seriesPoint', () => {
  it('gives back the measurement, tags and time of any line libs/lineproto writes (property)', () => {
    const name = fc.string({ minLength: 1, maxLength: 12 });
    fc.assert(
      fc.property(
        name,
        fc.dictionary(name, fc.string({ minLength: 1, maxLength: 12 }), { minKeys: 1, maxKeys: 4 }),
        fc.string({ maxLength: 20 }),
        fc.integer({ min: 0, max: 4_102_444_800_000 }),
        (measurement, tags, text, timeMs) => {
          const line = formatPoint({ measurement, tags, fields: { note: text, v: 1.5 }, timeMs }, 'v2');
          const p = seriesPoint(line);
          expect(p?.measurement).toBe(clean(measurement));
          expect(p?.tags).toEqual(
            Object.fromEntries(Object.entries(tags).map(([k, v]) => [clean(k), clean(v)])),
          );
          expect(p?.timeMs).toBe(timeMs);
        },
      ),
      { numRuns: 400 },
    );
  });

  it('refuses what is not a line', () => {
    expect(seriesPoint('no-space-here')).toBeUndefined();
    expect(seriesPoint('m,t=1 v=1 notatime')).toBeUndefined();
  });
});
