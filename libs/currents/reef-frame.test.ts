import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bedStressPa, directionTowardsDeg, logLawCd, toReefFrame } from './reef-frame.js';

const num = (min: number, max: number) => fc.double({ min, max, noNaN: true });

describe('reef frame (docs/contract-v1.md reef_axis_deg; docs/methods/currents.md 5.6)', () => {
  it('reef_axis 270: a current towards west gives u > 0, v = 0 (worked by hand)', () => {
    const r = toReefFrame(-0.2, 0, 270);
    expect(r.uMS).toBeCloseTo(0.2, 15);
    expect(Math.abs(r.vMS)).toBeLessThan(1e-15);
  });

  it('reef_axis 270: a current towards 180 gives v > 0 (v points to bearing 270 - 90 = 180) (docs/contract-v1.md section 3)', () => {
    const r = toReefFrame(0, -0.2, 270);
    expect(r.vMS).toBeCloseTo(0.2, 15);
    expect(Math.abs(r.uMS)).toBeLessThan(1e-15);
  });

  it('reef_axis 45: a current towards 45 is pure u; towards 315 (= 45 - 90) is pure +v (worked by hand)', () => {
    const a = toReefFrame(Math.SQRT1_2, Math.SQRT1_2, 45);
    expect(a.uMS).toBeCloseTo(1, 15);
    expect(Math.abs(a.vMS)).toBeLessThan(1e-15);
    const b = toReefFrame(-Math.SQRT1_2, Math.SQRT1_2, 45);
    expect(b.vMS).toBeCloseTo(1, 15);
  });

  it('v is 90 deg counter-clockwise from u for every axis and current (definition, property test)', () => {
    fc.assert(
      fc.property(num(0, 360), num(0.01, 2), (axis, s) => {
        // a current towards bearing axis - 90 is pure +v
        const b = ((axis - 90) * Math.PI) / 180;
        const r = toReefFrame(s * Math.sin(b), s * Math.cos(b), axis);
        expect(r.vMS).toBeCloseTo(s, 12);
        expect(Math.abs(r.uMS)).toBeLessThan(1e-12);
      }),
    );
  });

  it('speed is invariant to the reef rotation and to rotating the current (algebra, property test)', () => {
    fc.assert(
      fc.property(num(-3, 3), num(-3, 3), num(-720, 720), (e, n, angle) => {
        const r = toReefFrame(e, n, angle);
        expect(Math.hypot(r.uMS, r.vMS)).toBeCloseTo(Math.hypot(e, n), 12);
        // rotate (E, N) by the angle: the speed stays, the direction turns by the angle
        const a = (angle * Math.PI) / 180;
        const e2 = e * Math.cos(a) + n * Math.sin(a);
        const n2 = -e * Math.sin(a) + n * Math.cos(a);
        expect(Math.hypot(e2, n2)).toBeCloseTo(Math.hypot(e, n), 12);
        if (Math.hypot(e, n) > 1e-3) {
          const turn =
            (((directionTowardsDeg(e2, n2) - directionTowardsDeg(e, n) - angle) % 360) + 540) % 360;
          expect(Math.min(turn, 360 - turn) - 180).toBeCloseTo(0, 6);
        }
      }),
    );
  });
});

describe('direction towards (docs/methods/currents.md 5.6)', () => {
  it('east 90, south 180, west 270, north and calm 0 (worked by hand)', () => {
    expect(directionTowardsDeg(1, 0)).toBe(90);
    expect(directionTowardsDeg(0, -1)).toBe(180);
    expect(directionTowardsDeg(-1, 0)).toBe(270);
    expect(directionTowardsDeg(0, 1)).toBe(0);
    expect(directionTowardsDeg(0, 0)).toBe(0);
    expect(directionTowardsDeg(-1, 1)).toBeCloseTo(315, 12);
  });

  it('is in [0, 360) for every current, including -0 and tiny negative east (property test)', () => {
    expect(directionTowardsDeg(-1e-300, 1)).toBeLessThan(360);
    expect(directionTowardsDeg(-0, -0)).toBe(0);
    fc.assert(
      fc.property(num(-5, 5), num(-5, 5), (e, n) => {
        const d = directionTowardsDeg(e, n);
        expect(d).toBeGreaterThanOrEqual(0);
        expect(d).toBeLessThan(360);
      }),
    );
  });
});

describe('bed stress (docs/methods/currents.md 5.6)', () => {
  it('rho Cd U^2: 1025 x 0.03 x 0.2^2 = 1.23 Pa (worked by hand)', () => {
    expect(bedStressPa(0.2, 1025, 0.03)).toBeCloseTo(1.23, 12);
  });

  it('log-law Cd: h/z0 = e^5 gives (0.41/4)^2 = 0.01050625 (worked by hand)', () => {
    expect(logLawCd(Math.exp(5), 1)).toBeCloseTo(0.01050625, 14);
  });
});
