import { describe, expect, it } from 'vitest';
import { G_STANDARD, pressureResponse, solveDispersion } from './dispersion.js';
import { jonswapShape } from './synthetic.js';
import { puvDirection, type PuvInput } from './puv.js';

/** mulberry32 (common practice: a small 32-bit PRNG), uniform on [0, 1) */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const RHO = 1024;
const PATM = 10.1325;
const H = 4; // m
const ZP = 0.4; // m, pressure port
const ZU = 0.8; // m, velocity sample

/**
 * Linear random-phase sea on the burst grid, one direction per component: eta = sum a cos(wt + phi) at the
 * instrument; p head = eta Kp; (u, v) = eta omega cosh(k z_u)/sinh(k h) (cos alpha, sin alpha), alpha the
 * math angle the component travels towards (linear theory, e.g. Dean & Dalrymple 1991).
 */
function sea(dirTowardsMathDeg: (rand: () => number) => number, seed: number, n = 4096, fs = 2) {
  const rand = mulberry32(seed);
  const p = new Float64Array(n).fill(PATM + (RHO * G_STANDARD * (H - ZP)) / 1e4);
  const u = new Float64Array(n).fill(0.1); // a steady 0.1 m/s current east (removed by detrending)
  const v = new Float64Array(n);
  const df = fs / n;
  let sumE = 0;
  let sumEc = 0;
  let sumEs = 0;
  for (let j = Math.ceil(0.06 / df); j <= Math.floor(0.3 / df); j++) {
    const f = j * df;
    const e = jonswapShape(f, 0.1) * df; // energy a^2/2 up to a constant
    const a = Math.sqrt(2 * e) * 40;
    const alpha = (dirTowardsMathDeg(rand) * Math.PI) / 180;
    const phi = 2 * Math.PI * rand();
    const w = 2 * Math.PI * f;
    const k = solveDispersion(w, H);
    const kp = pressureResponse(k, ZP, H);
    const ku = (w * Math.cosh(k * ZU)) / Math.sinh(k * H);
    sumE += e;
    sumEc += e * Math.cos(alpha);
    sumEs += e * Math.sin(alpha);
    for (let t = 0; t < n; t++) {
      const c = a * Math.cos((2 * Math.PI * ((j * t) % n)) / n + phi);
      p[t] = (p[t] as number) + ((RHO * G_STANDARD) / 1e4) * c * kp;
      u[t] = (u[t] as number) + c * ku * Math.cos(alpha);
      v[t] = (v[t] as number) + c * ku * Math.sin(alpha);
    }
  }
  const input: PuvInput = {
    pDbar: p,
    uMS: u,
    vMS: v,
    fsHz: fs,
    sensorHeightM: ZP,
    velocityHeightM: ZU,
    patmDbar: PATM,
    rhoKgM3: RHO,
  };
  return { input, a1: sumEc / sumE, b1: sumEs / sumE };
}

describe('puvDirection (Longuet-Higgins et al. 1963; Kuik et al. 1988)', () => {
  it('a unidirectional sea travelling towards the north-east comes from 225 deg, spread ~0, r = 1', () => {
    const { input } = sea(() => 45, 1);
    const r = puvDirection(input);
    if (!r.ok) throw new Error(r.reason);
    expect(r.dirFromDeg).toBeCloseTo(225, 6);
    // coherence is just below 1 because Kp and Ku vary across a Welch bin: sigma1 = sqrt(2 (1 - coh))
    expect(r.spreadDeg).toBeLessThan(0.5);
    expect(Math.abs(r.rRatio - 1)).toBeLessThan(1e-3);
    expect(r.flag).toBe(1);
    expect(r.depthM).toBeCloseTo(H, 9);
  });

  it('waves towards the west (math 180 deg) come from 90 deg (east)', () => {
    const r = puvDirection(sea(() => 180, 2).input);
    expect(r.ok && r.dirFromDeg).toBeCloseTo(90, 6);
  });

  it('spread sea (normal directions, sigma 20 deg about math 200 deg): mean direction and sigma1 of the drawn sea', () => {
    const gauss = (rand: () => number): number =>
      200 + 20 * Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
    const { input, a1, b1 } = sea(gauss, 3);
    const r = puvDirection(input);
    if (!r.ok) throw new Error(r.reason);
    const wantDir = (((270 - (Math.atan2(b1, a1) * 180) / Math.PI) % 360) + 360) % 360;
    const wantSpread = (Math.sqrt(2 * (1 - Math.hypot(a1, b1))) * 180) / Math.PI;
    expect(Math.abs(r.dirFromDeg - wantDir)).toBeLessThan(2);
    expect(Math.abs(r.spreadDeg - wantSpread)).toBeLessThan(2);
    // the drawn sea is close to the population: m1 = exp(-sigma^2/2) gives sigma1 = 19.9 deg (algebra)
    expect(Math.abs(r.spreadDeg - 19.9)).toBeLessThan(4);
    expect(r.rRatio).toBeCloseTo(1, 2);
  });

  it('velocities of the wrong size (a gain error of 2 in u and v) fail the r-ratio QC with flag 3', () => {
    const { input } = sea(() => 45, 4);
    const u = Float64Array.from(input.uMS as Float64Array, (x) => 2 * x);
    const v = Float64Array.from(input.vMS as Float64Array, (x) => 2 * x);
    const r = puvDirection({ ...input, uMS: u, vMS: v });
    expect(Math.abs((r.ok ? r.rRatio : 0) - 4)).toBeLessThan(4e-3);
    expect(r.flag).toBe(3);
    expect(r.ok && r.dirFromDeg).toBeCloseTo(225, 6);
  });

  it('mismatched lengths give a stable code', () => {
    const { input } = sea(() => 45, 5, 256);
    expect(puvDirection({ ...input, vMS: new Float64Array(10) })).toMatchObject({
      ok: false,
      code: 'REEFD_WAVES_LENGTH_MISMATCH',
    });
  });
});
