import { describe, expect, it } from 'vitest';
import { huberWeight, robustLinearFit } from './robust.js';
import { sd, seeded } from './test-helpers.js';

describe('robustLinearFit (Huber IRLS)', () => {
  const xs = Array.from({ length: 30 }, (_, i) => i / 3);

  it('an exact line with one point 100 sigma off: Huber recovers it, plain least squares does not', () => {
    const r = seeded(1);
    const y = xs.map((x) => 1 + 2 * x + 0.05 * r.normal());
    y[7] = y[7]! + 5; // 100 sigma
    const sigma = xs.map(() => 0.05);
    const huber = robustLinearFit(
      xs.map((x) => [1, x]),
      y,
      sigma,
    );
    const plain = robustLinearFit(
      xs.map((x) => [1, x]),
      y,
      sigma,
      { loss: 'linear' },
    );
    if (!huber.ok || !plain.ok) throw new Error('fit failed');
    expect(Math.abs(huber.coef[0]! - 1)).toBeLessThan(0.05);
    expect(Math.abs(huber.coef[1]! - 2)).toBeLessThan(0.01);
    expect(Math.abs(plain.coef[0]! - 1)).toBeGreaterThan(0.1);
    expect(huber.robustWeights[7]).toBeLessThan(0.05);
    expect(plain.robustWeights.every((w) => w === 1)).toBe(true);
    expect(huber.scale).toBeGreaterThan(0.6);
    expect(huber.scale).toBeLessThan(1.5);
  });

  it('standard errors match the spread of estimates over 400 noisy replicates (within 10 %)', () => {
    const r = seeded(2);
    const slopes: number[] = [];
    const ses: number[] = [];
    for (let k = 0; k < 400; k++) {
      const sigma = xs.map((x) => 0.2 + 0.05 * x);
      const y = xs.map((x, i) => -3 + 0.7 * x + sigma[i]! * r.normal());
      const f = robustLinearFit(
        xs.map((x) => [1, x]),
        y,
        sigma,
      );
      if (!f.ok) throw new Error(f.reason);
      slopes.push(f.coef[1]!);
      ses.push(f.se[1]!);
    }
    const meanSe = ses.reduce((a, b) => a + b, 0) / ses.length;
    expect(sd(slopes) / meanSe).toBeGreaterThan(0.9);
    expect(sd(slopes) / meanSe).toBeLessThan(1.1);
  });

  it('the overlap factor multiplies the covariance', () => {
    const y = xs.map((x, i) => 2 * x + (i % 2 ? 0.1 : -0.1));
    const rows = xs.map((x) => [1, x]);
    const a = robustLinearFit(
      rows,
      y,
      y.map(() => 0.1),
      { loss: 'linear' },
    );
    const b = robustLinearFit(
      rows,
      y,
      y.map(() => 0.1),
      { loss: 'linear', overlapFactor: 3 },
    );
    if (!a.ok || !b.ok) throw new Error('fit failed');
    expect(b.se[1]! / a.se[1]!).toBeCloseTo(Math.sqrt(3), 10);
  });

  it('refuses a non-positive sigma', () => {
    const f = robustLinearFit([[1], [1]], [1, 2], [1, 0]);
    expect(f.ok).toBe(false);
  });

  it('Huber weights: 1 inside k, k/|u| outside', () => {
    expect(huberWeight(1, 1.345)).toBe(1);
    expect(huberWeight(-2.69, 1.345)).toBeCloseTo(0.5, 12);
  });
});
