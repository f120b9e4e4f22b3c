import { describe, it, expect } from 'vitest';
import { angleOffBearingDeg, alongBearingMS, defaultCurrentSigmaMS } from './geometry.js';
import { windowEndingAt, windowMean, windowSchedule } from './window-mean.js';

describe('window means (docs/methods/conventions.md 1.5, time base)', () => {
  const t0 = Date.UTC(2026, 0, 1, 12, 0, 0);
  const times = Array.from({ length: 10 }, (_, i) => t0 + i * 180_000); // 3 min interval, 30 min window
  it('uses flags 1-3 and inherits the worst included flag', () => {
    const vals = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
    const flags = [1, 1, 3, 1, 4, 9, 1, 1, 1, 1];
    const r = windowMean(times, vals, flags, t0, t0 + 1_800_000, 10);
    expect(r.n).toBe(8);
    expect(r.mean).toBeCloseTo((1 + 2 + 3 + 4 + 7 + 8 + 9 + 10) / 8, 12);
    expect(r.flag).toBe(3);
  });
  it('needs half the expected samples, else null and flag 9', () => {
    const flags = [4, 4, 4, 4, 4, 4, 1, 1, 1, 1];
    const r = windowMean(times, times, flags, t0, t0 + 1_800_000, 10);
    expect(r.mean).toBeNull();
    expect(r.flag).toBe(9);
  });
  it('standard error of the mean = sd/sqrt(n)', () => {
    const r = windowMean([0, 1, 2, 3], [1, 2, 3, 4], [1, 1, 1, 1], 0, 4, 4);
    expect(r.sem).toBeCloseTo(Math.sqrt(1.6666666666666667 / 4), 12);
  });
  it('aligns windows to UTC multiples and schedules them on the cadence', () => {
    const w = windowEndingAt(t0 + 17 * 60_000, 30);
    expect(w.endMs).toBe(t0);
    expect(w.centreMs).toBe(t0 - 900_000);
    const s = windowSchedule(t0, t0 + 3_600_000, 30, 10);
    expect(s.length).toBe(4); // windows ending at 12:30, 12:40, 12:50, 13:00
    expect(s[0]?.startMs).toBe(t0);
    expect(s[3]?.endMs).toBe(t0 + 3_600_000);
  });
});

describe('transect geometry (docs/methods/currents.md 5.6)', () => {
  it('projects the current on the bearing', () => {
    expect(alongBearingMS(-0.1, 0, 270)).toBeCloseTo(0.1, 12);
    expect(alongBearingMS(0, 0.1, 270)).toBeCloseTo(0, 12);
    const d = (300 * Math.PI) / 180;
    expect(angleOffBearingDeg(0.1 * Math.sin(d), 0.1 * Math.cos(d), 270)).toBeCloseTo(30, 10);
    expect(angleOffBearingDeg(0.1, 0, 270)).toBeCloseTo(180, 10);
  });
  it('default current sigma is at least 0.5 cm/s (docs/methods/uncertainty.md 9.3)', () => {
    expect(defaultCurrentSigmaMS(0)).toBeCloseTo(0.005, 12);
    expect(defaultCurrentSigmaMS(0.1)).toBeGreaterThan(0.005);
  });
});
