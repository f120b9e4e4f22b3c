import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  beamToInstrument,
  beamToInstrument3,
  earthToInstrument,
  gimbalPitchDeg,
  instrumentToBeam,
  instrumentToEarth,
  janusHead,
  rotationMatrix,
  totalTiltDeg,
} from './transforms.js';

const DEG = Math.PI / 180;
const s20 = Math.sin(20 * DEG);
const c20 = Math.cos(20 * DEG);

function close(actual: ArrayLike<number>, expected: readonly number[], tol: number): void {
  for (let i = 0; i < expected.length; i++) {
    expect(Math.abs((actual[i] as number) - (expected[i] as number))).toBeLessThan(tol);
  }
}

describe('beam -> instrument (docs/methods/currents.md 5.1)', () => {
  it('theta = 30 deg factors: a = 1, b = 1/(2 sqrt 3), d = 1/sqrt 2 (worked by hand)', () => {
    const h = janusHead(30);
    expect(h.a).toBeCloseTo(1, 14);
    expect(h.b).toBeCloseTo(1 / (2 * Math.sqrt(3)), 14);
    expect(h.d).toBeCloseTo(Math.SQRT1_2, 14);
  });

  it('flow along +x: beam 1 sees +u sin theta, beam 2 -u sin theta (worked by hand)', () => {
    close(beamToInstrument([s20, -s20, 0, 0], janusHead(20)), [1, 0, 0, 0], 1e-15);
  });

  it('flow along +y reaches beam 4 (towards +y) positive, beam 3 negative (worked by hand)', () => {
    close(beamToInstrument([0, 0, -s20, s20], janusHead(20)), [0, 1, 0, 0], 1e-15);
  });

  it('flow out of the face: all beams see w cos theta (worked by hand)', () => {
    close(beamToInstrument([c20, c20, c20, c20], janusHead(20)), [0, 0, 1, 0], 1e-15);
  });

  it('a concave head flips x and y (worked by hand)', () => {
    close(beamToInstrument([s20, -s20, -s20, s20], janusHead(20, false)), [-1, -1, 0, 0], 1e-15);
  });

  it('inhomogeneous beams give e = d (b1 + b2 - b3 - b4): [1, 1, 0, 0] at 30 deg -> e = sqrt 2, z = 1/sqrt 3 (worked by hand)', () => {
    close(beamToInstrument([1, 1, 0, 0], janusHead(30)), [0, 0, 1 / Math.sqrt(3), Math.SQRT2], 1e-15);
  });

  it('instrumentToBeam inverts beamToInstrument, error velocity included (algebra)', () => {
    const head = janusHead(25, true);
    const inst = beamToInstrument(instrumentToBeam([0.3, -0.2, 0.05, 0.01], head), head);
    close(inst, [0.3, -0.2, 0.05, 0.01], 1e-15);
  });

  it('rejects a beam angle outside (0, 60) deg', () => {
    expect(() => janusHead(75)).toThrow(/REEFD_CURRENTS_BEAM_ANGLE/);
  });
});

describe('three-beam solutions (docs/methods/currents.md 5.1)', () => {
  it('equal the four-beam solution when e = 0, each beam dropped in turn (algebra, property test)', () => {
    fc.assert(
      fc.property(
        fc.tuple(
          fc.double({ min: -2, max: 2, noNaN: true }),
          fc.double({ min: -2, max: 2, noNaN: true }),
          fc.double({ min: -0.2, max: 0.2, noNaN: true }),
        ),
        fc.constantFrom(20, 25, 30),
        fc.boolean(),
        ([x, y, z], angle, convex) => {
          const head = janusHead(angle, convex);
          const beams = instrumentToBeam([x, y, z, 0], head);
          const four = beamToInstrument(beams, head);
          for (let bad = 0; bad < 4; bad++) {
            const corrupted = Float64Array.from(beams);
            corrupted[bad] = 99; // the dropped beam's value must not matter
            const three = beamToInstrument3(corrupted, bad, head);
            close(three, [four[0] as number, four[1] as number, four[2] as number], 1e-12);
            expect(Number.isNaN(three[3])).toBe(true);
          }
        },
      ),
    );
  });

  it('differ from four beams when the flow is inhomogeneous (e != 0), so the test above can fail (algebra)', () => {
    const head = janusHead(20);
    const beams = instrumentToBeam([0.2, 0.1, 0, 0.05], head);
    const four = beamToInstrument(beams, head);
    const three = beamToInstrument3(beams, 0, head);
    expect(Math.abs((three[0] as number) - (four[0] as number))).toBeGreaterThan(0.01);
  });
});

describe('instrument <-> earth (docs/methods/currents.md 5.2)', () => {
  it('heading 90: instrument +y maps to east and +x to south (worked by hand)', () => {
    close(instrumentToEarth([0, 1, 0, 0], { headingDeg: 90, pitchDeg: 0, rollDeg: 0 }), [1, 0, 0, 0], 1e-15);
    close(instrumentToEarth([1, 0, 0, 0], { headingDeg: 90, pitchDeg: 0, rollDeg: 0 }), [0, -1, 0, 0], 1e-15);
  });

  it('heading 45: +y maps to north-east; heading 180: +y to south (worked by hand)', () => {
    close(
      instrumentToEarth([0, 1, 0, 0], { headingDeg: 45, pitchDeg: 0, rollDeg: 0 }),
      [Math.SQRT1_2, Math.SQRT1_2, 0, 0],
      1e-15,
    );
    close(
      instrumentToEarth([0, 1, 0, 0], { headingDeg: 180, pitchDeg: 0, rollDeg: 0 }),
      [0, -1, 0, 0],
      1e-15,
    );
  });

  it('positive pitch raises +y; positive roll lowers +x and tilts +z towards +x (worked by hand)', () => {
    const c30 = Math.cos(30 * DEG);
    close(instrumentToEarth([0, 1, 0], { headingDeg: 0, pitchDeg: 30, rollDeg: 0 }), [0, c30, 0.5], 1e-15);
    close(instrumentToEarth([1, 0, 0], { headingDeg: 0, pitchDeg: 0, rollDeg: 30 }), [c30, 0, -0.5], 1e-15);
    close(instrumentToEarth([0, 0, 1], { headingDeg: 0, pitchDeg: 0, rollDeg: 30 }), [0.5, 0, c30], 1e-15);
  });

  it('heading is applied after pitch: heading 90, pitch 30 sends +y to east and up (worked by hand)', () => {
    const c30 = Math.cos(30 * DEG);
    close(instrumentToEarth([0, 1, 0], { headingDeg: 90, pitchDeg: 30, rollDeg: 0 }), [c30, 0, 0.5], 1e-15);
  });

  it('the error velocity passes through the rotation unchanged (definition)', () => {
    const out = instrumentToEarth([0.1, 0.2, 0.3, 0.04], rotationMatrix(33, 4, -3));
    expect(out[3]).toBe(0.04);
  });

  it('gimbal pitch: p = atan(tan p cos r); p 10, r 60 -> 5.0383 deg (worked by hand)', () => {
    expect(gimbalPitchDeg(10, 0)).toBeCloseTo(10, 12);
    expect(gimbalPitchDeg(10, 60)).toBeCloseTo((Math.atan(Math.tan(10 * DEG) * 0.5) * 180) / Math.PI, 12);
    expect(gimbalPitchDeg(10, 60)).toBeCloseTo(5.0383, 3);
  });

  it('total tilt acos(cos p cos r): p = r = 0 -> 0, p 0 r 15 -> 15 (worked by hand)', () => {
    expect(totalTiltDeg(0, 0)).toBe(0);
    expect(totalTiltDeg(0, 15)).toBeCloseTo(15, 12);
  });
});

describe('round trip earth -> inst -> beam -> inst -> earth', () => {
  it('returns the earth velocity to 1e-12 for any attitude within 30 deg tilt (algebra, property test)', () => {
    fc.assert(
      fc.property(
        fc.tuple(
          fc.double({ min: -2, max: 2, noNaN: true }),
          fc.double({ min: -2, max: 2, noNaN: true }),
          fc.double({ min: -0.3, max: 0.3, noNaN: true }),
        ),
        fc.double({ min: 0, max: 360, maxExcluded: true, noNaN: true }),
        fc.double({ min: -30, max: 30, noNaN: true }),
        fc.double({ min: -30, max: 30, noNaN: true }),
        fc.constantFrom(20, 25, 30),
        fc.boolean(),
        ([e, n, u], heading, pitch, roll, angle, convex) => {
          const head = janusHead(angle, convex);
          const m = rotationMatrix(heading, pitch, roll);
          const beams = instrumentToBeam(earthToInstrument([e, n, u, 0], m), head);
          const back = instrumentToEarth(beamToInstrument(beams, head), m);
          close(back, [e, n, u, 0], 1e-12);
        },
      ),
    );
  });

  it('a known case: (0.3, -0.1, 0.02) m/s at heading 123, pitch 7, roll -4 survives the trip (worked example)', () => {
    const head = janusHead(25);
    const att = { headingDeg: 123, pitchDeg: 7, rollDeg: -4 };
    const inst = earthToInstrument([0.3, -0.1, 0.02, 0], att);
    // the rotation is orthonormal: the instrument-frame speed equals the earth-frame speed
    expect(Math.hypot(inst[0] as number, inst[1] as number, inst[2] as number)).toBeCloseTo(
      Math.hypot(0.3, -0.1, 0.02),
      14,
    );
    close(
      instrumentToEarth(beamToInstrument(instrumentToBeam(inst, head), head), att),
      [0.3, -0.1, 0.02, 0],
      1e-12,
    );
  });
});

describe('rotationMatrix against an independent construction', () => {
  /** Right-hand rotation by angle (deg) about a unit axis, by Rodrigues' formula; row-major 3 x 3. */
  function rodrigues(axis: [number, number, number], deg: number): number[] {
    const [x, y, z] = axis;
    const c = Math.cos(deg * DEG);
    const s = Math.sin(deg * DEG);
    const t = 1 - c;
    // prettier-ignore
    return [
      t * x * x + c,     t * x * y - s * z, t * x * z + s * y,
      t * x * y + s * z, t * y * y + c,     t * y * z - s * x,
      t * x * z - s * y, t * y * z + s * x, t * z * z + c,
    ];
  }
  function mul(a: number[], b: number[]): number[] {
    const out: number[] = [];
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++) {
        let s = 0;
        for (let k = 0; k < 3; k++) s += (a[3 * i + k] as number) * (b[3 * k + j] as number);
        out.push(s);
      }
    return out;
  }

  it('equals Rot(z, -heading) Rot(x, pitch) Rot(y, roll) built by Rodrigues (algebra, property test)', () => {
    // heading is clockwise seen from above, i.e. a right-hand rotation by -heading about up
    fc.assert(
      fc.property(
        fc.double({ min: -360, max: 360, noNaN: true }),
        fc.double({ min: -40, max: 40, noNaN: true }),
        fc.double({ min: -40, max: 40, noNaN: true }),
        (h, p, r) => {
          const expected = mul(
            mul(rodrigues([0, 0, 1], -h), rodrigues([1, 0, 0], p)),
            rodrigues([0, 1, 0], r),
          );
          close(rotationMatrix(h, p, r), expected, 1e-14);
        },
      ),
    );
  });
});
