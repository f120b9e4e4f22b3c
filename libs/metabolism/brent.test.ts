import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { brent, brentExpanding } from './brent.js';

describe('brent', () => {
  it('solves the classic cubic x^3 - 2x - 5 = 0', () => {
    // Root 2.0945514815423265 (Wallis' test equation, quoted by Brent 1973) (from memory).
    const r = brent((x) => x * x * x - 2 * x - 5, 2, 3);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.x).toBeCloseTo(2.0945514815423265, 14);
  });

  it('finds cos(x) = x (Dottie number 0.7390851332151607, from memory) in few evaluations', () => {
    let evals = 0;
    const r = brent(
      (x) => {
        evals++;
        return Math.cos(x) - x;
      },
      0,
      1,
    );
    expect(r.ok && r.x).toBeCloseTo(0.7390851332151607, 14);
    expect(evals).toBeLessThan(12); // superlinear, not bisection (~45 evaluations for 1e-13)
  });

  it('reports no bracket with a stable code', () => {
    const r = brent((x) => x * x + 1, -1, 1);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('REEFD_METABOLISM_NO_BRACKET');
  });

  it('reports NaN as a bad function value', () => {
    const r = brent((x) => (x > 0.3 ? Number.NaN : -1), 0, 1);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.code).toBe('REEFD_METABOLISM_BAD_FUNCTION_VALUE');
  });

  it('tolerates +Infinity where the function is undefined (uses the sign only)', () => {
    // f = log(1 - x) + 2 on x < 1, "+inf" beyond: root at 1 - e^-2 (algebra).
    const r = brent((x) => (x < 1 ? -(Math.log(1 - x) + 2) : Number.POSITIVE_INFINITY), 0, 5);
    expect(r.ok && r.x).toBeCloseTo(1 - Math.exp(-2), 12);
  });

  it('doubles the bracket up to the limit', () => {
    const f = (x: number) => x - 350; // root outside [-100, 100], inside [-400, 400] after 2 doublings
    const r = brentExpanding(f, 0, 100, 3);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.x).toBeCloseTo(350, 10);
      expect(r.doublings).toBe(2);
    }
    const r2 = brentExpanding((x) => x - 900, 0, 100, 3); // needs 4 doublings
    expect(r2.ok).toBe(false);
    if (!r2.ok) {
      expect(r2.code).toBe('REEFD_METABOLISM_NO_BRACKET');
      expect(r2.hi).toBe(800);
    }
  });

  it('property: finds the root of any monotone cubic shift to 1e-9', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -50, max: 50, noNaN: true }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        (r0, s) => {
          const f = (x: number) => s * (x - r0) + (x - r0) ** 3;
          const res = brent(f, -100, 100);
          return res.ok && Math.abs(res.x - r0) < 1e-9;
        },
      ),
    );
  });
});
