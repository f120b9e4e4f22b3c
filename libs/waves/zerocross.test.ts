import { describe, expect, it } from 'vitest';
import { responseOnGrid } from './dispersion.js';
import { jonswapPressureBurst } from './synthetic.js';
import { makeReconWork, reconstructSurface, zeroCrossingStats } from './zerocross.js';

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

describe('zeroCrossingStats (zero-upcrossing definition, IAHR 1989)', () => {
  it('a hand-made record: three waves of heights 2, 4, 1 and known crossing times', () => {
    // upcrossings between samples 1-2, 5-6, 9-10, 13-14 (interpolated at 1.5, 5.5, 9.5, 13.5)
    const eta = Float64Array.from([
      -1, -0.5, 0.5, 1, 0.5, -0.5, 0.5, 2, -1, -0.5, 0.5, 0.5, -0.5, -0.5, 0.5, 0,
    ]);
    const r = zeroCrossingStats(eta, eta.length, 2, new Float64Array(16));
    expect(r.nWaves).toBe(3);
    expect(r.hmaxM).toBe(3); // wave 2: max 2, min -1
    expect(r.h13M).toBe(3); // floor(3/3) = 1 highest
    expect(r.h110M).toBeNull(); // floor(3/10) = 0
    expect(r.tzS).toBeCloseTo((13.5 - 1.5) / 3 / 2, 12);
  });

  it('no upcrossing pair: no waves, nulls', () => {
    const r = zeroCrossingStats(Float64Array.from([1, 2, 3]), 3, 1, new Float64Array(4));
    expect(r).toEqual({ nWaves: 0, h13M: null, h110M: null, hmaxM: null, tzS: null });
  });
});

describe('reconstructSurface (linear transfer function 1/Kp inside the band)', () => {
  for (const n of [4096, 3000]) {
    it(`recovers the synthetic JONSWAP surface to 1e-9 rms (N = ${n}, h = 2 m, z = 0.3 m)`, () => {
      const h = 2;
      const zs = 0.3;
      const rho = 1025;
      const g = 9.80665;
      const { pDbar, etaM } = jonswapPressureBurst(
        { hm0M: 0.5, tpS: 8, fMaxHz: 0.4 }, // all energy below the 0.469 Hz cutoff
        { n, fsHz: 2, depthM: h, sensorHeightM: zs, rhoKgM3: rho, patmDbar: 10.1325 },
        mulberry32(77),
      );
      const head = new Float64Array(n);
      let mean = 0;
      for (let i = 0; i < n; i++) mean += head[i] = (1e4 * ((pDbar[i] as number) - 10.1325)) / (rho * g);
      mean /= n;
      for (let i = 0; i < n; i++) head[i] = (head[i] as number) - mean;
      const out = new Float64Array(n);
      const k = new Float64Array(n / 2 + 1);
      const kp = new Float64Array(n / 2 + 1);
      const df = 2 / n;
      const mHi = Math.floor(0.469 / df);
      responseOnGrid(df, mHi + 1, h, zs, g, k, kp);
      reconstructSurface(head, kp, Math.ceil(0.005 / df), mHi, makeReconWork(n), out);
      let se = 0;
      let ss = 0;
      for (let i = 0; i < n; i++) {
        se += ((out[i] as number) - (etaM[i] as number)) ** 2;
        ss += (etaM[i] as number) ** 2;
      }
      expect(Math.sqrt(se / ss)).toBeLessThan(1e-9);
    });
  }
});
