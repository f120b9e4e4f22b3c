import { describe, expect, it } from 'vitest';
import { addSample, blockMeans, createBlocks, meanOver, pruneBefore, valueAt } from './blocks.js';

const M = 60_000;

describe('block means', () => {
  it('averages samples per 15-minute block, late samples into their own block', () => {
    const b = createBlocks();
    addSample(b, 0, 1);
    addSample(b, 5 * M, 3);
    addSample(b, 31 * M, 10);
    addSample(b, 16 * M, 6); // late, into the middle block
    addSample(b, 2 * M, NaN); // ignored
    expect(b.k).toEqual([0, 1, 2]);
    expect(blockMeans(b).v).toEqual([2, 6, 10]);
    expect(blockMeans(b).tMs).toEqual([7.5 * M, 22.5 * M, 37.5 * M]);
    // Blocks wholly before toMs only.
    expect(blockMeans(b, 0, 40 * M).v).toEqual([2, 6]);
    expect(meanOver(b, 0, 30 * M)).toBe(4);
  });

  it('interpolates between blocks over short gaps only, and prunes by age', () => {
    const b = createBlocks();
    addSample(b, 0, 2);
    addSample(b, 60 * M, 6);
    expect(valueAt(b, 7.5 * M)).toBe(2);
    expect(valueAt(b, 37.5 * M)).toBe(4);
    expect(valueAt(b, 37.5 * M, 30 * M)).toBeUndefined();
    expect(valueAt(b, 100 * M)).toBeUndefined();
    pruneBefore(b, 10 * M);
    expect(b.k).toEqual([4]);
  });
});
