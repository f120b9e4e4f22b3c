import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { heapPeek, heapPop, heapPush, heapSize, newDeadlineHeap } from './index.js';

describe('deadline heap', () => {
  it('pops in (deadline, key) order whatever the push order, and survives a JSON round trip (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: 50 }), fc.constantFrom('a', 'b', 'c', 'd', 'e')), {
          maxLength: 200,
        }),
        fc.nat(),
        (entries, cut) => {
          let h = newDeadlineHeap();
          entries.forEach(([d, k], i) => {
            if (i === cut % Math.max(1, entries.length)) h = JSON.parse(JSON.stringify(h)) as typeof h;
            heapPush(h, d, k);
          });
          const got: [number, string][] = [];
          for (let x = heapPop(h); x !== undefined; x = heapPop(h)) got.push([x.deadlineMs, x.key]);
          const want = [...entries].sort((p, q) => p[0] - q[0] || (p[1] < q[1] ? -1 : p[1] > q[1] ? 1 : 0));
          expect(got).toEqual(want);
        },
      ),
    );
  });
  it('peeks without removing', () => {
    const h = newDeadlineHeap();
    heapPush(h, 5, 'x');
    heapPush(h, 3, 'y');
    expect(heapPeek(h)).toEqual({ deadlineMs: 3, key: 'y' });
    expect(heapSize(h)).toBe(2);
    expect(heapPeek(newDeadlineHeap())).toBeUndefined();
  });
});
