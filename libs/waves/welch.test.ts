import { describe, expect, it } from 'vitest';
import { chi2Quantile } from './chi2.js';
import { chooseSegmentLength, hannWindow, segmentCount, welchDof, welchPsd } from './welch.js';

function lcgNoise(n: number, seed: number): Float64Array {
  // 32-bit LCG (Numerical Recipes constants, common practice) + Box-Muller: deterministic test noise
  let s = seed >>> 0;
  const u = (): number => {
    s = (Math.imul(1664525, s) + 1013904223) >>> 0;
    return (s + 0.5) / 4294967296;
  };
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
  return x;
}

describe('segment length rule (docs/methods/waves.md 4.2)', () => {
  it('Ns = 2^round(log2(256 fs)), halved until K >= 3, min 8', () => {
    expect(chooseSegmentLength(2048, 2)).toBe(512); // K = 7
    expect(chooseSegmentLength(2048, 4)).toBe(1024); // K = 3
    expect(chooseSegmentLength(2048, 8)).toBe(1024); // 2048 would give K = 1
    expect(chooseSegmentLength(4096, 1)).toBe(256);
    expect(chooseSegmentLength(16, 10)).toBe(8);
    expect(segmentCount(2048, 512)).toBe(7);
    expect(segmentCount(1500, 256)).toBe(10);
  });

  it('DOF 36 K^2/(19 K - 1): K = 1 gives 2 (Welch 1967); CI from chi2 quantiles (Jenkins & Watts 1968)', () => {
    expect(welchDof(1)).toBe(2);
    expect(welchDof(7)).toBeCloseTo(13.3636, 4);
    const r = welchPsd(lcgNoise(2048, 1), 2, 512);
    expect(r.nSegments).toBe(7);
    expect(r.dof).toBeCloseTo(13.3636, 4);
    expect(r.ciLower).toBeCloseTo(r.dof / chi2Quantile(0.975, r.dof), 14);
    expect(r.ciLower).toBeLessThan(1);
    expect(r.ciUpper).toBeGreaterThan(2); // nu ~ 13: upper factor ~ 2.6 (common practice)
  });

  it('sum of the periodic Hann window squared is 3 Ns/8 (algebra)', () => {
    expect(hannWindow(512).sumSq).toBeCloseTo(192, 10);
  });
});

describe('Parseval', () => {
  it('sum S df equals the mean window-weighted variance of the segments exactly (1e-12)', () => {
    const x = lcgNoise(2000, 5);
    const ns = 256;
    const r = welchPsd(x, 4, ns);
    let sumS = 0;
    for (const s of r.psd) sumS += s * r.dfHz;
    const { w, sumSq } = hannWindow(ns);
    let acc = 0;
    for (let j = 0; j < r.nSegments; j++) {
      let mean = 0;
      for (let i = 0; i < ns; i++) mean += x[j * 128 + i] as number;
      mean /= ns;
      for (let i = 0; i < ns; i++) acc += ((w[i] as number) * ((x[j * 128 + i] as number) - mean)) ** 2;
    }
    expect(sumS / (acc / sumSq / r.nSegments)).toBeCloseTo(1, 12);
  });

  it('sum S df equals the variance of a long white-noise record within 2 %', () => {
    const x = lcgNoise(65536, 9);
    let m = 0;
    for (const v of x) m += v;
    m /= x.length;
    let variance = 0;
    for (const v of x) variance += (v - m) ** 2;
    variance /= x.length;
    const r = welchPsd(x, 2, 256);
    let sumS = 0;
    for (const s of r.psd) sumS += s * r.dfHz;
    expect(Math.abs(sumS / variance - 1)).toBeLessThan(0.02);
    // white noise of unit variance at fs = 2: one-sided level 2 sigma^2/fs = 1 m^2/Hz (common practice)
    expect(r.psd[64]).toBeGreaterThan(0.5);
    expect(r.psd[64]).toBeLessThan(1.5);
  });

  it('rejects a non-power-of-two or too long segment', () => {
    expect(() => welchPsd(new Float64Array(100), 1, 96)).toThrow(/REEFD_WAVES_WELCH_SIZE/);
    expect(() => welchPsd(new Float64Array(100), 1, 128)).toThrow(
      /^REEFD_WAVES_WELCH_SIZE: got fs=1, nperseg=128, N=100/,
    );
  });
});
