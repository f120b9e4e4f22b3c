import { describe, expect, it } from 'vitest';
import { seeded } from '../daily/test-helpers.js';
import { CONSTITUENTS, TIDE_EPOCH_MS, fitTide, predictTide, selectConstituents } from './harmonics.js';

const freq = (name: string) => CONSTITUENTS.find((c) => c[0] === name)![1];
const series = (days: number, f: (h: number) => number, stepMin = 30, startMs = Date.UTC(2026, 2, 1)) => {
  const t: number[] = [];
  const y: number[] = [];
  for (let ms = startMs; ms < startMs + days * 86_400_000; ms += stepMin * 60_000) {
    t.push(ms);
    y.push(f((ms - TIDE_EPOCH_MS) / 3.6e6));
  }
  return { t, y };
};
const wave = (A: number, name: string, gDeg: number) => (h: number) =>
  A * Math.cos(2 * Math.PI * freq(name) * h - (gDeg * Math.PI) / 180);

describe('harmonic tide fit', () => {
  it('a pure M2 + S2 series over 30 days returns both amplitudes and phases (data-free analytic case)', () => {
    const { t, y } = series(30, (h) => 1.2 + wave(0.37, 'M2', 40)(h) + wave(0.13, 'S2', 300)(h));
    const f = fitTide(t, y, { allow: ['M2', 'S2'] });
    if (!f.ok) throw new Error(f.reason);
    const m2 = f.constituents.find((c) => c.name === 'M2')!;
    const s2 = f.constituents.find((c) => c.name === 'S2')!;
    expect(m2.amplitude).toBeCloseTo(0.37, 9);
    expect(m2.phaseDeg).toBeCloseTo(40, 7);
    expect(s2.amplitude).toBeCloseTo(0.13, 9);
    expect(s2.phaseDeg).toBeCloseTo(300, 7);
    expect(f.meanLevel).toBeCloseTo(1.2, 9);
    expect(f.residualSd).toBeLessThan(1e-9);
  });

  it('with every constituent allowed, the ones absent come out near zero and the prediction holds 12 h ahead', () => {
    const truth = (h: number) =>
      wave(0.37, 'M2', 40)(h) + wave(0.13, 'S2', 300)(h) + wave(0.05, 'K1', 100)(h);
    const { t, y } = series(32, truth);
    const f = fitTide(t, y);
    if (!f.ok) throw new Error(f.reason);
    expect(f.constituents.map((c) => c.name)).toContain('N2');
    for (const c of f.constituents)
      if (!['M2', 'S2', 'K1'].includes(c.name)) expect(c.amplitude).toBeLessThan(1e-8);
    const ahead = t[t.length - 1]! + 12 * 3.6e6;
    expect(predictTide(f, ahead)).toBeCloseTo(truth((ahead - TIDE_EPOCH_MS) / 3.6e6), 8);
  });

  it('the Rayleigh criterion admits M2 and S2 together only after 14.8 days', () => {
    const names = (days: number) => selectConstituents(days * 24).map((c) => c[0]);
    expect(names(3)).toEqual(['M2', 'K1', 'M4', 'M6']);
    expect(names(14)).not.toContain('S2');
    expect(names(15)).toEqual(expect.arrayContaining(['M2', 'K1', 'S2', 'O1', 'M4']));
    expect(names(15)).not.toContain('N2');
    expect(names(28)).toContain('N2');
    // 1/|f(M2) - f(S2)| = 14.765 days (common practice)
    expect(1 / Math.abs(freq('M2') - freq('S2')) / 24).toBeCloseTo(14.765, 3);
  });

  it('standard errors of the amplitudes match 200 noisy replicates (within 15 %)', () => {
    const r = seeded(4);
    const amps: number[] = [];
    const ses: number[] = [];
    for (let k = 0; k < 200; k++) {
      const { t, y } = series(16, (h) => wave(0.37, 'M2', 40)(h) + 0.03 * r.normal(), 60);
      const f = fitTide(t, y, { allow: ['M2', 'S2', 'K1'] });
      if (!f.ok) throw new Error(f.reason);
      const m2 = f.constituents.find((c) => c.name === 'M2')!;
      amps.push(m2.amplitude);
      ses.push(m2.amplitudeSe);
    }
    const mean = amps.reduce((a, b) => a + b, 0) / amps.length;
    const sd = Math.sqrt(amps.reduce((a, b) => a + (b - mean) ** 2, 0) / (amps.length - 1));
    const se = ses.reduce((a, b) => a + b, 0) / ses.length;
    expect(Math.abs(mean - 0.37)).toBeLessThan(0.002);
    expect(sd / se).toBeGreaterThan(0.85);
    expect(sd / se).toBeLessThan(1.15);
  });

  it('refuses an empty or too short record', () => {
    expect(fitTide([], []).ok).toBe(false);
    const { t, y } = series(0.2, wave(0.3, 'M2', 0));
    const f = fitTide(t, y);
    expect(f.ok ? '' : f.reason).toBe('10 samples');
  });
});
