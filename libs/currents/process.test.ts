import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { processEnsemble } from './process.js';
import { synthesizeBeamEnsemble } from './synthesize.js';
import type { AdcpEnsemble, AdcpSensorConfig, CurrentContext, CurrentOk, CurrentResult } from './types.js';

const DEG = Math.PI / 180;
const sin = (d: number) => Math.sin(d * DEG);
const cos = (d: number) => Math.cos(d * DEG);

function ok(r: CurrentResult): CurrentOk {
  if (!r.ok) throw new Error(`expected ok, got ${r.code}: ${r.message}`);
  return r;
}

/** n bins, every one carrying the same four beam velocities. */
function beamEnsemble(beams: readonly number[], n: number, att: [number, number, number]): AdcpEnsemble {
  return {
    coord: 'beam',
    blankM: 0.1,
    binM: 0.1,
    velMS: Array.from({ length: n }, () => [...beams]),
    headingDeg: att[0],
    pitchDeg: att[1],
    rollDeg: att[2],
  };
}

/** Uniform flow u in the bins averages to u (1 - z1/(7 h)) (docs/methods/currents.md 5.5; worked by hand). */
const uniformMean = (u: number, z1: number, h: number) => u * (1 - z1 / (7 * h));

const UP: AdcpSensorConfig = { heightM: 0.35, beamAngleDeg: 20, orientation: 'up' };
const CTX: CurrentContext = { depthM: 2.35, reefAxisDeg: 270 };

describe('known flows by hand through the whole chain (docs/methods/currents.md 5.1-5.5)', () => {
  it('up-looking, level, heading 0: beams [u s, -u s, 0, 0] are a current towards east (worked by hand)', () => {
    const u = 0.2;
    const r = ok(processEnsemble(beamEnsemble([u * sin(20), -u * sin(20), 0, 0], 30, [0, 0, 0]), UP, CTX));
    // D = 2 m, D cos 20 = 1.8794 m: far edges 0.2 + 0.1 n <= 1.8794 keep bins 0..16
    expect(r.binsUsed).toBe(17);
    expect(r.binFlags.slice(0, 17).every((f) => f === 1)).toBe(true);
    expect(r.binFlags.slice(17).every((f) => f === 4)).toBe(true);
    expect(r.eastMS).toBeCloseTo(uniformMean(u, 0.5, 2.35), 14);
    expect(Math.abs(r.northMS)).toBeLessThan(1e-15);
    expect(r.dirToDeg).toBe(90);
    expect(r.depthSource).toBe('pressure');
    expect(r.flag).toBe(1);
  });

  it('declination and alignment offset add to the compass heading: compass 80 + 7 + 3 = 90 turns +y to east (worked by hand)', () => {
    const sensor: AdcpSensorConfig = { ...UP, declinationDeg: 7, headingOffsetDeg: 3 };
    const r = ok(
      processEnsemble(beamEnsemble([0, 0, -0.1 * sin(20), 0.1 * sin(20)], 20, [80, 0, 0]), sensor, CTX),
    );
    expect(r.eastMS).toBeCloseTo(uniformMean(0.1, 0.5, 2.35), 14);
    expect(Math.abs(r.northMS)).toBeLessThan(1e-15);
  });

  it('up-looking, rolled 8 deg: beams [sin 28, sin(-12), sin 8 cos 20, sin 8 cos 20] are 1 m/s east (worked by hand)', () => {
    // beam unit vectors rotated by R(8): b1 = sin(8 + 20), b2 = sin(8 - 20), b3 = b4 = sin 8 cos 20
    const b3 = sin(8) * cos(20);
    const r = ok(processEnsemble(beamEnsemble([sin(28), sin(-12), b3, b3], 20, [0, 0, 8]), UP, CTX));
    expect(r.eastMS).toBeCloseTo(uniformMean(1, 0.35 + 0.15 * cos(8), 2.35), 13);
    expect(Math.abs(r.northMS)).toBeLessThan(1e-14);
  });

  it('a concave head reads the same beams as the opposite flow (worked by hand)', () => {
    const r = ok(
      processEnsemble(
        beamEnsemble([0.2 * sin(20), -0.2 * sin(20), 0, 0], 20, [0, 0, 0]),
        { ...UP, convex: false },
        CTX,
      ),
    );
    expect(r.eastMS).toBeCloseTo(-uniformMean(0.2, 0.5, 2.35), 14);
  });
});

describe('down-looking heads (bins below the head, z_n = z_head - r_n cos p cos r)', () => {
  const DOWN: AdcpSensorConfig = { heightM: 1.5, beamAngleDeg: 20, orientation: 'down' };
  const ctx: CurrentContext = { depthM: 2.5, reefAxisDeg: 270 };

  it('level, heading 0: flow east reaches beam 1 as -u sin theta (+x points west when flipped) (worked by hand)', () => {
    const r = ok(
      processEnsemble(beamEnsemble([-0.2 * sin(20), 0.2 * sin(20), 0, 0], 20, [0, 0, 0]), DOWN, ctx),
    );
    // the bed limits the range: D = z_head = 1.5, D cos 20 = 1.4095; far edges 0.2 + 0.1 n keep 0..12
    expect(r.binsUsed).toBe(13);
    expect(r.binFlags[12]).toBe(1);
    expect(r.binFlags[13]).toBe(4);
    // lowest valid bin: z = 1.5 - 1.35 = 0.15 m
    expect(r.eastMS).toBeCloseTo(uniformMean(0.2, 0.15, 2.5), 14);
    expect(Math.abs(r.northMS)).toBeLessThan(1e-15);
  });

  it('level, heading 0: flow north keeps its sign on beams 3 and 4 (+y is unchanged) (worked by hand)', () => {
    const r = ok(
      processEnsemble(beamEnsemble([0, 0, -0.1 * sin(20), 0.1 * sin(20)], 20, [0, 0, 0]), DOWN, ctx),
    );
    expect(r.northMS).toBeCloseTo(uniformMean(0.1, 0.15, 2.5), 14);
    expect(Math.abs(r.eastMS)).toBeLessThan(1e-15);
  });

  it('rolled 8 deg: beams [sin 208, sin 168, sin 188 cos 20, sin 188 cos 20] are 1 m/s east (worked by hand)', () => {
    // roll + 180 deg: b1 = sin(188 + 20), b2 = sin(188 - 20), b3 = b4 = sin 188 cos 20
    const b3 = sin(188) * cos(20);
    const r = ok(processEnsemble(beamEnsemble([sin(208), sin(168), b3, b3], 20, [0, 0, 8]), DOWN, ctx));
    const z1 = 1.5 - (0.15 + 0.1 * (r.binsUsed - 1)) * cos(8);
    expect(r.eastMS).toBeCloseTo(uniformMean(1, z1, 2.5), 13);
    expect(Math.abs(r.northMS)).toBeLessThan(1e-14);
  });

  it('does not need the surface: bins stay valid in shallow water above the head too (definition)', () => {
    const r = ok(
      processEnsemble(beamEnsemble([-0.2 * sin(20), 0.2 * sin(20), 0, 0], 20, [0, 0, 0]), DOWN, {
        ...ctx,
        depthM: 1.6,
      }),
    );
    expect(r.binsUsed).toBe(13);
  });
});

describe('synthesized ensembles at any attitude (inverse transforms, docs/methods/currents.md 5.1-5.2)', () => {
  it('uniform flow returns u (1 - z1/(7h)) for any heading and tilt below 10 deg, up and down (property test)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -0.8, max: 0.8, noNaN: true }),
        fc.double({ min: -0.8, max: 0.8, noNaN: true }),
        fc.double({ min: 0, max: 360, noNaN: true }),
        fc.double({ min: -6, max: 6, noNaN: true }),
        fc.double({ min: -6, max: 6, noNaN: true }),
        fc.constantFrom<'up' | 'down'>('up', 'down'),
        (e, n, heading, pitch, roll, orientation) => {
          const sensor: AdcpSensorConfig = {
            heightM: orientation === 'up' ? 0.35 : 1.8,
            beamAngleDeg: 25,
            orientation,
          };
          const ens = synthesizeBeamEnsemble({
            sensor,
            nBins: 25,
            blankM: 0.1,
            binM: 0.1,
            headingDeg: heading,
            pitchDeg: pitch,
            rollDeg: roll,
            profile: () => [e, n, 0],
          });
          const r = ok(processEnsemble(ens, sensor, { depthM: 2.6, reefAxisDeg: 270 }));
          const k = cos(pitch) * cos(roll);
          const z1 = orientation === 'up' ? 0.35 + 0.15 * k : 1.8 - (0.15 + 0.1 * (r.binsUsed - 1)) * k;
          expect(r.eastMS).toBeCloseTo(uniformMean(e, z1, 2.6), 12);
          expect(r.northMS).toBeCloseTo(uniformMean(n, z1, 2.6), 12);
        },
      ),
      { numRuns: 60 },
    );
  });

  it('a power-law profile u* (z/h)^(1/6) through beams returns 6/7 u* within 0.5 % (constant top) and 0.05 % (power top) (analytic)', () => {
    const h = 2.35;
    const profile = (z: number): [number, number, number] => {
      const s = 0.3 * Math.pow(z / h, 1 / 6);
      return [s * sin(250), s * cos(250), 0];
    };
    for (const top of ['constant', 'power'] as const) {
      const sensor: AdcpSensorConfig = { ...UP, beamAngleDeg: 25, topExtrapolation: top };
      const ens = synthesizeBeamEnsemble({
        sensor,
        nBins: 25,
        blankM: 0.1,
        binM: 0.1,
        headingDeg: 33,
        pitchDeg: 2,
        rollDeg: -3,
        profile,
      });
      const r = ok(processEnsemble(ens, sensor, { depthM: h, reefAxisDeg: 270 }));
      const rel = r.speedMS / ((0.3 * 6) / 7) - 1;
      expect(Math.abs(rel)).toBeLessThan(top === 'constant' ? 0.005 : 0.0005);
      expect(r.dirToDeg).toBeCloseTo(250, 10);
    }
  });
});

describe('three-beam solutions inside an ensemble (docs/methods/currents.md 5.1)', () => {
  const sensor: AdcpSensorConfig = { ...UP, beamAngleDeg: 25 };
  const base = synthesizeBeamEnsemble({
    sensor,
    nBins: 20,
    blankM: 0.1,
    binM: 0.1,
    headingDeg: 140,
    pitchDeg: 3,
    rollDeg: -2,
    profile: (z) => [0.2 * Math.pow(z / 2.35, 1 / 6), -0.1, 0.01],
  });
  const four = ok(processEnsemble(base, sensor, CTX));

  it.each([0, 1, 2, 3])('beam %i dropped in bin 4 gives the four-beam result, flag 3 (algebra)', (beam) => {
    const velMS = base.velMS.map((row, n) => row.map((v, i) => (n === 4 && i === beam ? null : v)));
    const r = ok(processEnsemble({ ...base, velMS }, sensor, CTX));
    expect(r.eastMS).toBeCloseTo(four.eastMS, 12);
    expect(r.northMS).toBeCloseTo(four.northMS, 12);
    expect(r.binFlags[4]).toBe(3);
    expect(r.flag).toBe(3);
    expect(r.notes.some((s) => s.startsWith('three_beam'))).toBe(true);
  });

  it('two bad beams fail the bin (4) and four nulls mark it missing (9) (docs/methods/currents.md 5.1; docs/methods/qc.md 7.4)', () => {
    const velMS = base.velMS.map((row, n) =>
      n === 4 ? [null, null, row[2] ?? 0, row[3] ?? 0] : n === 5 ? [null, null, null, null] : row,
    );
    const r = ok(processEnsemble({ ...base, velMS }, sensor, CTX));
    expect(r.binFlags[4]).toBe(4);
    expect(r.binFlags[5]).toBe(9);
    expect(r.binsUsed).toBe(four.binsUsed - 2);
  });
});
