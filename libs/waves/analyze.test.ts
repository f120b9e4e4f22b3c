import { describe, expect, it } from 'vitest';
import { analyzeBurst } from './analyze.js';
import { chi2Quantile } from './chi2.js';
import { G_STANDARD, pressureResponse, solveDispersion } from './dispersion.js';
import { jonswapPressureBurst } from './synthetic.js';
import type { BurstInput, WavesOk, WavesResult } from './types.js';

/** mulberry32 (common practice: a small 32-bit PRNG), uniform on [0, 1); seeded, so the tests are exact. */
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

const RHO = 1023.3; // kg m-3, warm reef water (fictional station)
const PATM = 10.1325; // dbar, 1 atm (docs/methods/conventions.md 1.3)
const DBAR_PER_M = (RHO * G_STANDARD) / 1e4;

function ok(r: WavesResult): WavesOk {
  if (!r.ok) throw new Error(`expected ok, got ${r.code}: ${r.reason}`);
  return r;
}

function mono(n: number, fs: number, h: number, zs: number, a: number, periodS: number): Float64Array {
  const w = (2 * Math.PI) / periodS;
  const kp = pressureResponse(solveDispersion(w, h), zs, h);
  const p = new Float64Array(n);
  for (let i = 0; i < n; i++) p[i] = PATM + DBAR_PER_M * (h - zs + a * kp * Math.cos((w * i) / fs + 0.3));
  return p;
}

const base = (p: ArrayLike<number | null>, fs: number, zs: number): BurstInput => ({
  pDbar: p,
  fsHz: fs,
  t0Ms: 1_700_000_000_000,
  sensorHeightM: zs,
  patmDbar: PATM,
  rhoKgM3: RHO,
});

describe('analyzeBurst: monochromatic wave (linear theory, common practice: Hm0 = 4 a/sqrt 2 = 2 sqrt2 a)', () => {
  it('a = 0.4 m, T = 8 s, h = 3 m, z = 0.5 m: Hm0, H1/3, Tp, Tz within 1 %', () => {
    const r = ok(analyzeBurst(base(mono(2048, 2, 3, 0.5, 0.4, 8), 2, 0.5)));
    expect(Math.abs(r.hm0M / (2 * Math.SQRT2 * 0.4) - 1)).toBeLessThan(0.01);
    expect(Math.abs((r.h13M as number) / 0.8 - 1)).toBeLessThan(0.01); // H = 2a for a sine
    expect(Math.abs(r.tpS / 8 - 1)).toBeLessThan(0.01);
    expect(Math.abs((r.tzS as number) / 8 - 1)).toBeLessThan(0.01);
    expect(r.depthM).toBeCloseTo(3, 9);
    expect(r.tCentreMs).toBe(1_700_000_000_000 + 512_000);
    expect(r.flag).toBe(1);
    expect(r.nWaves).toBe(127);
    // nu = 13.36 for K = 7 (Welch 1967); 95 % factors from chi2 quantiles (Jenkins & Watts 1968)
    expect(r.dof).toBeCloseTo(13.3636, 4);
    expect(r.psdCi95.lower).toBeCloseTo(r.dof / chi2Quantile(0.975, r.dof), 14);
    expect(r.psdCi95.upper).toBeCloseTo(r.dof / chi2Quantile(0.025, r.dof), 14);
    expect(r.psdCi95.lower).toBeGreaterThan(0.5);
    expect(r.psdCi95.upper).toBeLessThan(3);
  });

  for (const n of [1800, 1799]) {
    it(`a wave that does not fit the burst (T = 7.3 s, N = ${n}, Bluestein ${n % 2 ? 'full' : 'half'}-length path) within 1 %`, () => {
      const r = ok(analyzeBurst(base(mono(n, 2, 2, 0.3, 0.25, 7.3), 2, 0.3)));
      expect(Math.abs(r.hm0M / (2 * Math.SQRT2 * 0.25) - 1)).toBeLessThan(0.01);
      expect(Math.abs((r.h13M as number) / 0.5 - 1)).toBeLessThan(0.01);
      expect(Math.abs(r.tpS / 7.3 - 1)).toBeLessThan(0.01);
    });
  }

  it('a linear tide of 0.3 m over the burst is removed; depth is the burst mean', () => {
    const p = mono(2048, 2, 3, 0.5, 0.4, 8);
    for (let i = 0; i < p.length; i++) p[i] = (p[i] as number) + DBAR_PER_M * 0.3 * (i / 2047 - 0.5);
    const r = ok(analyzeBurst(base(p, 2, 0.5)));
    expect(Math.abs(r.hm0M / (2 * Math.SQRT2 * 0.4) - 1)).toBeLessThan(0.01);
    expect(r.depthM).toBeCloseTo(3, 9);
  });
});

describe('analyzeBurst: gaps as null and long bursts', () => {
  it('null samples (as in the contract bursts) are gaps like NaN', () => {
    const p: (number | null)[] = Array.from(mono(2048, 2, 3, 0.5, 0.4, 8));
    for (let i = 0; i < 15; i++) p[7 + i * 130] = null;
    const r = ok(analyzeBurst(base(p, 2, 0.5)));
    expect(r.flag).toBe(1); // 0.7 % < 1 %
    expect(r.notes).toContain('interpolated 15 non-finite samples');
    expect(Math.abs(r.hm0M / (2 * Math.SQRT2 * 0.4) - 1)).toBeLessThan(0.01);
  });

  it('a 2 h burst with a curved tide (0.5 m quadratic) is detrended quadratically: Hm0 within 1 %', () => {
    const n = 14400; // 2 Hz x 2 h
    const p = mono(n, 2, 3, 0.5, 0.4, 8);
    const lin = mono(n, 2, 3, 0.5, 0.4, 8);
    for (let i = 0; i < n; i++) {
      const u = (2 * i) / (n - 1) - 1;
      p[i] = (p[i] as number) + DBAR_PER_M * 0.5 * u * u;
      lin[i] = (lin[i] as number) + DBAR_PER_M * 0.5 * u * u;
    }
    const r = ok(analyzeBurst(base(p, 2, 0.5)));
    expect(Math.abs(r.hm0M / (2 * Math.SQRT2 * 0.4) - 1)).toBeLessThan(0.01);
    // forcing the linear detrend (threshold above 2 h) leaves the parabola in the IG band
    const rLin = ok(analyzeBurst(base(lin, 2, 0.5), { quadraticDetrendAboveS: 1e9 }));
    expect(rLin.hm0IgM as number).toBeGreaterThan(10 * (r.hm0IgM as number));
  });
});

describe('analyzeBurst: random-phase JONSWAP seas (Hasselmann et al. 1973, gamma 3.3)', () => {
  // Tp per depth so that the sea lies below the Kp^2 = 0.1 cutoff (deeper sensors cannot see short waves).
  const cases = [
    { h: 1, zs: 0.2, hm0: 0.3, tp: 5 },
    { h: 2, zs: 0.3, hm0: 0.5, tp: 8 },
    { h: 5, zs: 0.5, hm0: 1.0, tp: 10 },
    { h: 10, zs: 1.0, hm0: 1.5, tp: 14 },
  ];
  for (const [i, c] of cases.entries()) {
    it(`h=${c.h} m, z=${c.zs} m, Hm0=${c.hm0} m, Tp=${c.tp} s: Hm0 within 3 %, Tp within 5 %`, () => {
      const { pDbar } = jonswapPressureBurst(
        { hm0M: c.hm0, tpS: c.tp },
        { n: 4096, fsHz: 2, depthM: c.h, sensorHeightM: c.zs, rhoKgM3: RHO, patmDbar: PATM },
        mulberry32(1000 + i),
      );
      const r = ok(analyzeBurst(base(pDbar, 2, c.zs)));
      expect(Math.abs(r.hm0M / c.hm0 - 1)).toBeLessThan(0.03);
      expect(Math.abs(r.tpS / c.tp - 1)).toBeLessThan(0.05);
      expect(r.depthM).toBeCloseTo(c.h, 6);
      // Rayleigh sea (common practice): H1/3 ~ Hm0 within ~10 % in intermediate depth
      expect(Math.abs((r.h13M as number) / r.hm0M - 1)).toBeLessThan(0.12);
      expect(r.tm02S).toBeLessThan(r.tm01S);
      expect(r.tm01S).toBeLessThan(r.tpS);
      expect(r.hm0M ** 2).toBeCloseTo(r.hm0SsM ** 2 + (r.hm0IgM as number) ** 2, 12);
      expect(r.hrmsM).toBeCloseTo(r.hm0M / Math.SQRT2, 12);
    });
  }
});

describe('analyzeBurst: f^-4 tail above the cutoff (Jones & Monismith 2007)', () => {
  it('deep sensor, short waves (h = 8 m, z = 0.5 m, Tp = 6 s): the tail recovers most of the lost Hm0', () => {
    const { pDbar } = jonswapPressureBurst(
      { hm0M: 0.8, tpS: 6 },
      { n: 4096, fsHz: 2, depthM: 8, sensorHeightM: 0.5, rhoKgM3: RHO, patmDbar: PATM },
      mulberry32(99),
    );
    const plain = ok(analyzeBurst(base(pDbar, 2, 0.5)));
    const tail = ok(analyzeBurst(base(pDbar, 2, 0.5), { tailToHz: 1.0 }));
    expect(plain.cutoffHz).toBeLessThan(0.25); // fp = 0.167 Hz: much of the sea is above the cutoff
    expect(plain.hm0M).toBeLessThan(0.8 * 0.93);
    expect(tail.hm0M).toBeGreaterThan(plain.hm0M);
    // JONSWAP falls as f^-5, so an f^-4 tail to 1 Hz overshoots a little (+4.9 % here vs -8.9 % without)
    expect(Math.abs(tail.hm0M / 0.8 - 1)).toBeLessThan(0.06);
    expect(Math.abs(tail.hm0M / 0.8 - 1)).toBeLessThan(Math.abs(plain.hm0M / 0.8 - 1));
    expect(tail.cutoffHz).toBe(plain.cutoffHz);
    expect(tail.h13M).toBe(plain.h13M); // the reconstruction ignores the tail
    expect(tail.notes.some((s) => s.startsWith('f^-4 tail added'))).toBe(true);
  });
});

describe('analyzeBurst: QC outcomes (docs/methods/waves.md 4.1, QARTOD flags)', () => {
  const good = (): Float64Array => mono(2048, 2, 3, 0.5, 0.4, 8);

  it('sensor out of the water: flag 4 REEFD_WAVES_DRY, depth still reported', () => {
    const p = new Float64Array(2048).fill(PATM + 0.003); // 3 cm of "head": below the 5 cm margin
    const r = analyzeBurst(base(p, 2, 0.5));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.code).toBe('REEFD_WAVES_DRY');
      expect(r.flag).toBe(4);
      expect(r.depthM).toBeCloseTo(0.5 + 0.003 / DBAR_PER_M, 9);
    }
  });

  it('flat (clipped) burst: flag 4 REEFD_WAVES_FLAT', () => {
    const p = new Float64Array(2048).fill(PATM + 2 * DBAR_PER_M);
    for (let i = 0; i < p.length; i++) p[i] = (p[i] as number) + 1e-5 * Math.sin(i); // 0.1 mm
    const r = analyzeBurst(base(p, 2, 0.5));
    expect(r.ok ? 0 : r.code).toBe('REEFD_WAVES_FLAT');
  });

  it('a flat record with a few large spikes is still flat once they are removed', () => {
    const p = new Float64Array(2048).fill(PATM + 2 * DBAR_PER_M);
    for (let i = 0; i < 8; i++) p[200 * i + 50] = PATM + 3 * DBAR_PER_M; // +1 m spikes
    const r = analyzeBurst(base(p, 2, 0.5));
    expect(r.ok ? 0 : [r.code, r.flag]).toEqual(['REEFD_WAVES_FLAT', 4]);
  });

  it('> 5 % non-finite: flag 4; 3 % non-finite: interpolated, flag 3, same Hm0 within 1 %', () => {
    const p1 = good();
    for (let i = 0; i < 120; i++) p1[i * 17] = NaN;
    const r1 = analyzeBurst(base(p1, 2, 0.5));
    expect(r1.ok ? 0 : [r1.code, r1.flag]).toEqual(['REEFD_WAVES_NONFINITE', 4]);
    const p2 = good();
    for (let i = 0; i < 60; i++) p2[i * 31] = Number.POSITIVE_INFINITY;
    const r2 = ok(analyzeBurst(base(p2, 2, 0.5)));
    expect(r2.flag).toBe(3);
    expect(Math.abs(r2.hm0M / (2 * Math.SQRT2 * 0.4) - 1)).toBeLessThan(0.01);
  });

  it('0.5 % spikes are replaced (flag 1) and do not change Hm0 beyond 1 %', () => {
    const p = good();
    for (let i = 0; i < 10; i++) p[100 + i * 150] = (p[100 + i * 150] as number) + 5; // +5 dbar spikes
    const r = ok(analyzeBurst(base(p, 2, 0.5)));
    expect(r.flag).toBe(1);
    expect(r.notes.some((s) => s.includes('10 spikes'))).toBe(true);
    expect(Math.abs(r.hm0M / (2 * Math.SQRT2 * 0.4) - 1)).toBeLessThan(0.01);
  });

  it('too short, empty, fs <= 0 and missing density give stable codes and flags', () => {
    expect(analyzeBurst(base(new Float64Array(10).fill(12), 2, 0.5))).toMatchObject({
      flag: 4,
      code: 'REEFD_WAVES_TOO_SHORT',
    });
    expect(analyzeBurst(base([], 2, 0.5))).toMatchObject({ flag: 9, code: 'REEFD_WAVES_EMPTY' });
    expect(analyzeBurst(base(good(), 0, 0.5))).toMatchObject({ flag: 4, code: 'REEFD_WAVES_BAD_INPUT' });
    expect(analyzeBurst({ ...base(good(), 2, 0.5), rhoKgM3: NaN })).toMatchObject({
      flag: 9,
      code: 'REEFD_WAVES_BAD_INPUT',
    });
  });

  it('coarse Welch bins (nperseg 128 at 2 Hz, df 0.0156 Hz): IG not evaluated, flag 2, hm0 = hm0_ss', () => {
    const r = ok(analyzeBurst(base(good(), 2, 0.5), { nperseg: 128 }));
    expect(r.flags.ig).toBe(2);
    expect(r.hm0IgM).toBeNull();
    expect(r.hm0M).toBe(r.hm0SsM);
  });

  it('a cutoff below 0.05 Hz (h = 10 m, z = 0.5 m, minKp2 = 0.95): SS flag 4', () => {
    const r = ok(analyzeBurst(base(mono(4096, 2, 10, 0.5, 0.3, 40), 2, 0.5), { minKp2: 0.95 }));
    expect(r.cutoffHz).toBeLessThan(0.05);
    expect(r.flags.ss).toBe(4);
    expect(r.flag).toBe(4);
  });

  it('short burst of 600 samples gives fewer than 50 waves: zero-crossing flag 3', () => {
    const r = ok(analyzeBurst(base(mono(600, 2, 3, 0.5, 0.4, 8), 2, 0.5)));
    expect(r.nWaves).toBeLessThan(50);
    expect(r.flags.zeroCrossing).toBe(3);
  });

  it('the cutoff reported is where Kp^2 = 0.1 (h = 3 m, z = 0.5 m)', () => {
    const r = ok(analyzeBurst(base(good(), 2, 0.5)));
    const kp = pressureResponse(solveDispersion(2 * Math.PI * r.cutoffHz, 3), 0.5, 3);
    expect(kp * kp).toBeCloseTo(0.1, 10);
    const r2 = ok(analyzeBurst(base(good(), 2, 0.5), { minKp2: 0.02, maxFreqHz: 0.3 }));
    expect(r2.cutoffHz).toBe(0.3);
  });
});

describe('a burst as the message carries it (a plain array, null for a bad sample)', () => {
  // The processor can hand p_dbar to analyzeBurst as parsed, instead of first copying it into a Float64Array
  // through a per-sample callback (the copy cost more than half the analysis): the result must not change.
  const parsed = (p: Float64Array, nulls: readonly number[]): (number | null)[] => {
    // Rounded like the wire format (4 decimals), then read back through JSON as a sensor message would be.
    const a: (number | null)[] = JSON.parse(JSON.stringify(Array.from(p, (x) => Math.round(x * 1e4) / 1e4)));
    for (const i of nulls) a[i % a.length] = null;
    return a;
  };
  const copied = (a: readonly (number | null)[]) =>
    Float64Array.from(a, (x) => (x === null ? Number.NaN : x));

  it('gives the same result, number for number, with and without gaps, any length and rate', () => {
    const cases: [number, number, number[]][] = [
      [2048, 2, []],
      [2048, 2, [5, 700, 701, 702, 2047]],
      [1800, 2, [0, 1, 900]],
      [4096, 4, [17, 3000]],
      [513, 1, [100]],
      [2048, 2, Array.from({ length: 150 }, (_, i) => i * 13)], // > 5 %: refused alike
    ];
    for (const [n, fs, nulls] of cases) {
      const p = jonswapPressureBurst(
        { hm0M: 0.5, tpS: 8 },
        { n, fsHz: fs, depthM: 2.2, sensorHeightM: 0.3, rhoKgM3: RHO, patmDbar: PATM },
        mulberry32(n + nulls.length),
      ).pDbar;
      const a = parsed(p, nulls);
      const fromArray = analyzeBurst(base(a, fs, 0.3));
      const fromCopy = analyzeBurst(base(copied(a), fs, 0.3));
      expect(fromArray).toStrictEqual(fromCopy);
      expect(fromArray.ok).toBe(new Set(nulls.map((i) => i % n)).size <= 0.05 * n);
    }
  });
});
