import { describe, it, expect } from 'vitest';
import { aggregateFlags, derivedFlag, worseFlag } from './index.js';

describe('aggregateFlags (docs/methods/qc.md 7.4)', () => {
  it('takes the worst evaluated test, ignoring not-evaluated', () => {
    expect(aggregateFlags([1, 2, 3])).toBe(3);
    expect(aggregateFlags([1, 4, 3, 2])).toBe(4);
    expect(aggregateFlags([2, 1])).toBe(1);
  });
  it('gives 2 when no test ran and 9 when missing', () => {
    expect(aggregateFlags([])).toBe(2);
    expect(aggregateFlags([2, 2])).toBe(2);
    expect(aggregateFlags([1, 9, 3])).toBe(9);
  });
});

describe('derivedFlag (docs/methods/qc.md 7.4)', () => {
  it('is 9 when a required input is 4 or 9, else the worst of 1 < 2 < 3', () => {
    expect(derivedFlag([1, 4])).toBe(9);
    expect(derivedFlag([1, 9])).toBe(9);
    expect(derivedFlag([1, 2])).toBe(2);
    expect(derivedFlag([3, 2, 1])).toBe(3);
    expect(derivedFlag([])).toBe(2);
  });
  it('worseFlag orders 1 < 2 < 3 < 4 < 9', () => {
    expect(worseFlag(3, 2)).toBe(3);
    expect(worseFlag(1, 9)).toBe(9);
  });
});
