// Fictional reef ensembles (invented for reefd; no real site) with instrument-like noise, checked
// against the ranges of the trade: reef-flat depth-averaged currents of about 0.01-0.26 m/s and
// reef-crest currents of about 0.1-0.5 m/s (common practice).
import { describe, expect, it } from 'vitest';
import { processEnsemble } from './process.js';
import { synthesizeBeamEnsemble } from './synthesize.js';
import type { AdcpEnsemble, AdcpSensorConfig } from './types.js';

const DEG = Math.PI / 180;

/** Seeded uniform generator in [0, 1) (mulberry32), so the noise is reproducible. */
function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Add zero-mean beam noise (uniform, +-amp m/s) to an ensemble. */
function noisy(ens: AdcpEnsemble, amp: number, rnd: () => number): AdcpEnsemble {
  return { ...ens, velMS: ens.velMS.map((row) => row.map((v) => (v ?? 0) + amp * (2 * rnd() - 1))) };
}

function reefEnsemble(sensor: AdcpSensorConfig, h: number, speed: number, towardsDeg: number, nBins: number) {
  return synthesizeBeamEnsemble({
    sensor,
    nBins,
    blankM: 0.1,
    binM: 0.1,
    headingDeg: 117,
    pitchDeg: 1.8,
    rollDeg: -2.3,
    profile: (z) => {
      const s = speed * Math.pow(Math.min(z, h) / h, 1 / 6);
      return [s * Math.sin(towardsDeg * DEG), s * Math.cos(towardsDeg * DEG), 0];
    },
  });
}

describe('fictional ensembles in the ranges of the trade (common practice)', () => {
  const sensor: AdcpSensorConfig = { heightM: 0.3, beamAngleDeg: 25, orientation: 'up', declinationDeg: 4 };

  it.each([0.02, 0.12, 0.22])('reef flat, h 1.3 m, surface speed %s m/s: speed in 0.01-0.26 m/s', (speed) => {
    const rnd = seeded(7);
    const r = processEnsemble(noisy(reefEnsemble(sensor, 1.3, speed, 250, 20), 0.005, rnd), sensor, {
      depthM: 1.3,
      reefAxisDeg: 270,
    });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.speedMS).toBeGreaterThanOrEqual(0.01);
    expect(r.speedMS).toBeLessThanOrEqual(0.26);
    expect(r.flag).toBe(1);
    expect(r.uMS).toBeGreaterThan(0); // towards 250 is mostly shoreward for reef_axis 270
    expect(r.sigmaMS).toBeLessThan(0.05);
  });

  it.each([0.14, 0.3, 0.55])('reef crest, h 2.2 m, surface speed %s m/s: speed in 0.1-0.5 m/s', (speed) => {
    const rnd = seeded(11);
    const r = processEnsemble(noisy(reefEnsemble(sensor, 2.2, speed, 275, 30), 0.01, rnd), sensor, {
      depthM: 2.2,
      hm0SsM: 0.8,
      reefAxisDeg: 270,
    });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.speedMS).toBeGreaterThanOrEqual(0.1);
    expect(r.speedMS).toBeLessThanOrEqual(0.5);
    expect(Math.abs(r.dirToDeg - 275)).toBeLessThan(5);
    // bed stress at Cd 0.03: rho Cd U^2 of order 0.3-8 Pa on a crest (common practice)
    expect(r.tauBedPa).toBeGreaterThan(0.3);
    expect(r.tauBedPa).toBeLessThan(8);
  });
});
