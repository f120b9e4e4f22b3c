import { describe, expect, it } from 'vitest';
import { createRng } from './prng.js';

describe('seeded generator', () => {
  it('repeats for a seed and differs between seeds', () => {
    const a = createRng(42);
    const b = createRng(42);
    const c = createRng(43);
    const xa = Array.from({ length: 5 }, () => a.next());
    expect(Array.from({ length: 5 }, () => b.next())).toEqual(xa);
    expect(Array.from({ length: 5 }, () => c.next())).not.toEqual(xa);
  });
  it('forks are fixed by the label, not by the call order', () => {
    const r1 = createRng(7);
    const r2 = createRng(7);
    const a = r1.fork('x').next();
    r2.fork('y');
    expect(r2.fork('x').next()).toBe(a);
  });
  it('gives uniform and standard normal moments', () => {
    // Mean 1/2 and variance 1/12 for U(0,1); 0 and 1 for N(0,1); 1e5 samples keep the error < 1 % (common practice).
    const r = createRng(1);
    let s = 0;
    let s2 = 0;
    let g = 0;
    let g2 = 0;
    const n = 100_000;
    for (let i = 0; i < n; i++) {
      const u = r.next();
      s += u;
      s2 += u * u;
      const z = r.normal();
      g += z;
      g2 += z * z;
    }
    expect(s / n).toBeCloseTo(0.5, 2);
    expect(s2 / n - (s / n) ** 2).toBeCloseTo(1 / 12, 3);
    expect(g / n).toBeCloseTo(0, 1);
    expect(g2 / n).toBeCloseTo(1, 1);
  });
});
