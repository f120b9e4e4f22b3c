// The delivery ledger of the database and Kafka outputs: marks only rise, an unclean stop is known at the
// next start, another epoch's marks say nothing; positions ride on spool entries.
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { ReefdError } from '../../libs/contract/index.js';
import type * as AtomicFile from './atomic-file.js';
import { DeliveryLedger, splitPosition, withPosition } from './delivery-ledger.js';

// The ledger's file writes can be made to fail as on a full disk (ENOSPC), as the device would.
const disk = vi.hoisted(() => ({ full: false }));
vi.mock('./atomic-file.js', async (importOriginal) => {
  const real = await importOriginal<typeof AtomicFile>();
  return {
    ...real,
    writeFileAtomic: async (file: string, text: string) => {
      if (disk.full)
        throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
      return real.writeFileAtomic(file, text);
    },
  };
});

const dirs: string[] = [];
afterEach(async () => {
  disk.full = false;
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

  it('on a full disk keeps a delivered batch delivered, and holds the next one until the marks are saved', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-ledger-'));
    dirs.push(dir);
    const file = join(dir, 'outputs', 'influx.json');
    const a = await DeliveryLedger.open(file, 'e1');
    await a.delivered(new Map([[0, 5]]));
    disk.full = true;
    // The batch reached the destination: the failed save neither throws nor lowers the mark.
    await expect(a.delivered(new Map([[0, 10]]))).resolves.toBeUndefined();
    expect(a.hwm(0)).toBe(10);
    // The next batch must wait: ready() refuses with a retriable REEFD_DISK_FULL.
    const err = await a.ready().catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ReefdError);
    expect([(err as ReefdError).code, (err as ReefdError).retriable]).toEqual(['REEFD_DISK_FULL', true]);
    // On disk the ledger is still the last saved one, one batch behind at most.
    expect(JSON.parse(await readFile(file, 'utf8'))).toMatchObject({ hwm: { 0: 5 } });
    disk.full = false;
    await a.ready();
    const b = await DeliveryLedger.open(file, 'e1');
    expect([b.hwm(0), b.uncleanStart]).toEqual([10, true]);
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
