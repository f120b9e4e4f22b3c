// The delivery ledger of the database and Kafka outputs: marks only rise, an unclean stop is known at the
// next start, another epoch's marks say nothing; positions ride on spool entries.
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import { DeliveryLedger, splitPosition, withPosition } from './delivery-ledger.js';

const dirs: string[] = [];
afterEach(async () => {
  for (const d of dirs.splice(0)) await rm(d, { recursive: true, force: true });
});

describe('delivery ledger', () => {
  it('raises marks, knows an unclean stop, forgets another epoch', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-ledger-'));
    dirs.push(dir);
    const file = join(dir, 'outputs', 'kafka.json');
    const a = await DeliveryLedger.open(file, 'e1');
    expect(a.uncleanStart).toBe(false);
    await a.delivered(
      new Map([
        [0, 10],
        [2, 7],
      ]),
    );
    await a.delivered(new Map([[0, 4]])); // never lowered
    expect([a.hwm(0), a.hwm(1), a.hwm(2)]).toEqual([10, -1, 7]);

    // No close (a kill): the next start knows a batch may have landed unrecorded.
    const b = await DeliveryLedger.open(file, 'e1');
    expect(b.uncleanStart).toBe(true);
    expect(b.hwm(0)).toBe(10);
    await b.close();
    const c = await DeliveryLedger.open(file, 'e1');
    expect(c.uncleanStart).toBe(false);

    const other = await DeliveryLedger.open(file, 'e2');
    expect([other.uncleanStart, other.hwm(0)]).toEqual([false, -1]);
  });

  it('carries a position on an entry and back, for any entry text (property)', () => {
    fc.assert(
      fc.property(
        fc.option(fc.integer({ min: 0, max: Number.MAX_SAFE_INTEGER })),
        fc.string(),
        (pos, body) => {
          const p = pos ?? undefined;
          const e = withPosition(p, '[' + body);
          expect(splitPosition(e)).toEqual({ pos: p, body: '[' + body });
        },
      ),
      { numRuns: 500 },
    );
    // A line-protocol line never starts with a digit run and a tab: it stays as it is.
    expect(splitPosition('oxygen,site=a o2=1 1')).toEqual({ pos: undefined, body: 'oxygen,site=a o2=1 1' });
  });
});
