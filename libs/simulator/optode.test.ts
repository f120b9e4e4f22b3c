import { describe, expect, it } from 'vitest';
import { optodeSalinityFactor } from './optode.js';

describe('optode salinity setting', () => {
  it('matches the combined-fit check value and is 1 when the setting is right', () => {
    // 0.80000 for S_set 0 -> S 35 at 10 degC (Garcia & Gordon 1992 combined fit, as libs/seawater evaluates it).
    expect(optodeSalinityFactor(35, 0, 10)).toBeCloseTo(0.8, 4);
    expect(optodeSalinityFactor(35.2, 35.2, 27)).toBe(1);
  });
  it('an optode set to 0 reads about 20 % high in reef water', () => {
    // ~20 % high at S 35 (docs/methods/seawater.md 2.4).
    const f = optodeSalinityFactor(35, 0, 28);
    expect(1 / f).toBeGreaterThan(1.18);
    expect(1 / f).toBeLessThan(1.26);
  });
});
