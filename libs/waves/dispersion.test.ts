import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  G_STANDARD,
  guoGuess,
  pressureResponse,
  solveDispersion,
  solveDispersionGrid,
} from './dispersion.js';

describe('solveDispersion', () => {
  it('satisfies omega^2 = g k tanh(kh) to 1e-12 relative (identity, property over kh 1e-3..50)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.05, max: 60, noNaN: true }),
        fc.double({ min: -3, max: Math.log10(50), noNaN: true }),
        (h, logK0h) => {
          const k0h = 10 ** logK0h;
          const omega = Math.sqrt((k0h * G_STANDARD) / h);
          const k = solveDispersion(omega, h);
          const lhs = omega * omega;
          const rhs = G_STANDARD * k * Math.tanh(k * h);
          return Math.abs(lhs - rhs) <= 1e-12 * lhs;
        },
      ),
      { numRuns: 2000, seed: 42 },
    );
  });

  it('check value T = 10 s, h = 10 m, g = 9.81: k = 0.068019 rad/m, L = 92.374 m (scipy brentq)', () => {
    const k = solveDispersion((2 * Math.PI) / 10, 10, 9.81);
    expect(k).toBeCloseTo(0.06801907425474224, 12);
    expect((2 * Math.PI) / k).toBeCloseTo(92.374, 3);
  });

  it('Shore Protection Manual (1984) Table C-1, d/L vs d/L0 (from memory, 4 decimals)', () => {
    const table: [number, number][] = [
      [0.01, 0.04032],
      [0.5, 0.5018],
    ];
    for (const [dL0, dL] of table) {
      // d/L0 = k0 h/(2 pi); pick h = 1 m, omega^2 = g k0
      const omega = Math.sqrt(G_STANDARD * 2 * Math.PI * dL0);
      const kh = solveDispersion(omega, 1);
      expect(Math.abs(kh / (2 * Math.PI) - dL)).toBeLessThan(6e-5);
    }
  });

  it('Guo (2002) first guess is within 0.8 % (Guo 2002) and Fenton & McKee (1990) within 2 % (from memory)', () => {
    for (let lx = -2.5; lx <= 1.7; lx += 0.01) {
      const k0h = 10 ** lx;
      const h = 3;
      const omega = Math.sqrt((k0h * G_STANDARD) / h);
      const k = solveDispersion(omega, h);
      expect(Math.abs(guoGuess(omega, h) / k - 1)).toBeLessThan(0.008);
      const T = (2 * Math.PI) / omega;
      const L0 = (G_STANDARD * T * T) / (2 * Math.PI);
      const L = L0 * Math.pow(Math.tanh(Math.pow((2 * Math.PI * Math.sqrt(h / G_STANDARD)) / T, 1.5)), 2 / 3);
      expect(Math.abs((2 * Math.PI) / L / k - 1)).toBeLessThan(0.02);
    }
  });

  it('limits: shallow water k -> omega/sqrt(gh), deep water k -> omega^2/g (common practice)', () => {
    const h = 0.5;
    const omegaShallow = 0.001;
    expect(solveDispersion(omegaShallow, h) / (omegaShallow / Math.sqrt(G_STANDARD * h))).toBeCloseTo(1, 6);
    const omegaDeep = 2 * Math.PI; // 1 s wave in 50 m
    expect(solveDispersion(omegaDeep, 50) / ((omegaDeep * omegaDeep) / G_STANDARD)).toBeCloseTo(1, 12);
    expect(solveDispersion(0, 3)).toBe(0);
    expect(() => solveDispersion(-1, 3)).toThrow(/REEFD_WAVES_DISPERSION_DOMAIN/);
    expect(() => solveDispersion(1, 0)).toThrow(/^REEFD_WAVES_DISPERSION_DOMAIN: got omega=1, depth=0/);
  });

  it('the grid solver gives the same roots as solveDispersion to 1e-13 relative (fine and coarse grids)', () => {
    for (const [w0, dw, n, h] of [
      [0, (2 * Math.PI) / 1024, 800, 2.5], // whole-burst grid, 2 Hz, N = 2048
      [0.3, (2 * Math.PI) / 128, 60, 0.4], // coarse Welch grid, very shallow
      [0.01, 0.05, 200, 40], // coarse, deep water at the top end
    ] as const) {
      const out = new Float64Array(n);
      solveDispersionGrid(w0, dw, n, h, G_STANDARD, out);
      for (let i = 0; i < n; i++) {
        const w = w0 + i * dw;
        const k = solveDispersion(w, h);
        if (w === 0) expect(out[i]).toBe(0);
        else expect(Math.abs((out[i] as number) / k - 1)).toBeLessThan(1e-13);
      }
    }
  });
});

describe('pressureResponse', () => {
  it('equals cosh(kz)/cosh(kh) where that does not overflow, 1 at the surface and at k = 0', () => {
    for (const [k, z, h] of [
      [0.1, 0.5, 3],
      [1.3, 0.2, 2],
      [0.01, 1, 10],
    ] as const) {
      expect(pressureResponse(k, z, h)).toBeCloseTo(Math.cosh(k * z) / Math.cosh(k * h), 14);
    }
    expect(pressureResponse(0, 0.5, 3)).toBe(1);
    expect(pressureResponse(0.7, 3, 3)).toBeCloseTo(1, 15);
    // deep water: exp(-k (h - z)) with no overflow at kh = 2000
    expect(pressureResponse(100, 19.9, 20)).toBeCloseTo(Math.exp(-10), 15);
  });
});
