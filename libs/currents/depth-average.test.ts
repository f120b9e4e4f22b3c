import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { depthAverage } from './depth-average.js';

/** Bin centres from z1 upwards in steps of dz, up to zTop, and u = uStar (z/h)^(1/6). */
function powerProfile(h: number, z1: number, dz: number, zTop: number, uStar: number) {
  const z: number[] = [];
  const u: number[] = [];
  for (let k = 0; z1 + k * dz <= zTop + 1e-9; k++) {
    const zk = z1 + k * dz;
    z.push(zk);
    u.push(uStar * Math.pow(zk / h, 1 / 6));
  }
  return { z, u };
}

describe('depth average (docs/methods/currents.md 5.5)', () => {
  // The analytic mean of u* (z/h)^(1/6) over 0..h is u* 6/7 (integral of x^(1/6) on [0, 1]).
  const cases: [number, number, number, number][] = [
    [2.0, 0.5, 0.1, 1.8], // reef crest: 14 bins of 0.1 m
    [1.2, 0.5, 0.1, 1.0], // shallow flat: 6 bins
    [10, 1.0, 0.5, 9.0], // fore reef: 17 bins of 0.5 m
  ];
  it.each(cases)(
    'h = %s m: power-law profile returns u* 6/7 within 0.5 %% (constant top) and 0.03 %% (power top) (analytic)',
    (h, z1, dz, zTop) => {
      const { z, u } = powerProfile(h, z1, dz, zTop, 0.2);
      const exact = (0.2 * 6) / 7;
      const r = depthAverage(z, u, h);
      // The bed layer is exact for m = 6; trapezoids err low on the concave profile, and a constant
      // top misses the rise from z_M to h, so both variants come out slightly low.
      expect(r.constantMS / exact - 1).toBeLessThan(0);
      expect(Math.abs(r.constantMS / exact - 1)).toBeLessThan(0.005);
      expect(Math.abs(r.powerMS / exact - 1)).toBeLessThan(0.0003);
    },
  );

  it('uniform flow in the bins gives u (1 - z1/((m + 1) h)): the bed layer follows the power law (worked by hand)', () => {
    // z1 = 0.5, h = 2, m = 6: 1 - 0.5/14 = 0.9642857...; u = 0.25 -> 0.24107142857...
    const z = [0.5, 0.7, 0.9, 1.1, 1.3];
    const u = [0.25, 0.25, 0.25, 0.25, 0.25];
    expect(depthAverage(z, u, 2).constantMS).toBeCloseTo(0.25 * (1 - 0.5 / 14), 15);
    expect(depthAverage(z, u, 2, 7).constantMS).toBeCloseTo(0.25 * (1 - 0.5 / 16), 15);
  });

  it('a uniform flow reaching to the bed limit z1 -> 0 returns itself exactly (worked by hand)', () => {
    const z = [1e-300, 0.5, 1.0];
    expect(depthAverage(z, [0.3, 0.3, 0.3], 1.5).constantMS).toBe(0.3);
  });

  it('two bins by hand: z 0.4, 0.8 m, u 0.1, 0.2 m/s, h 1 m (worked by hand)', () => {
    // bed 0.1*0.4*6/7 = 0.0342857; interior 0.5*(0.3)*0.4 = 0.06; top 0.2*0.2 = 0.04 -> 0.1342857
    expect(depthAverage([0.4, 0.8], [0.1, 0.2], 1).constantMS).toBeCloseTo(0.024 / 0.7 + 0.1, 15);
  });

  it('is linear in u and scales with it (algebra, property test)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 2, maxLength: 20 }),
        fc.double({ min: -3, max: 3, noNaN: true }),
        (u, k) => {
          const z = u.map((_, i) => 0.3 + 0.1 * i);
          const h = 0.3 + 0.1 * u.length + 0.2;
          const a = depthAverage(z, u, h);
          const b = depthAverage(
            z,
            u.map((x) => k * x),
            h,
          );
          expect(Math.abs(b.constantMS - k * a.constantMS)).toBeLessThan(1e-12);
          expect(Math.abs(b.powerMS - k * a.powerMS)).toBeLessThan(1e-12);
        },
      ),
    );
  });

  it('rejects empty or mismatched inputs', () => {
    expect(() => depthAverage([], [], 1)).toThrow(/REEFD_CURRENTS_SHAPE/);
  });
});
