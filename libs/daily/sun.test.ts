import { describe, expect, it } from 'vitest';
import {
  greenwichSiderealDeg,
  isSunDown,
  nextSunrise,
  solarCoordinates,
  solarElevationDeg,
  sunEvents,
} from './sun.js';

describe('sun position (Meeus 1998)', () => {
  it('Meeus example 25.a: 1992 Oct 13.0 TD, RA 198.38083 deg, declination -7.78507 deg (from memory)', () => {
    const c = solarCoordinates(2448908.5);
    expect(c.raDeg).toBeCloseTo(198.38083, 4);
    expect(c.decDeg).toBeCloseTo(-7.78507, 4);
    expect(c.lambdaDeg).toBeCloseTo(199.90895, 4);
  });

  it('Meeus examples 12.a and 12.b: sidereal time 197.693195 and 128.7378734 deg (from memory)', () => {
    expect(greenwichSiderealDeg(2446895.5)).toBeCloseTo(197.693195, 5);
    expect(greenwichSiderealDeg(2446896.30625)).toBeCloseTo(128.7378734, 5);
  });

  it('at the equator on the March equinox the noon sun is near the zenith and sets about 12 h later', () => {
    // 2026-03-20 12:07 UTC at longitude 0: solar noon within the equation of time (about 7 min).
    const noon = Date.UTC(2026, 2, 20, 12, 7);
    expect(solarElevationDeg(noon, 0, 0)).toBeGreaterThan(89.5);
    const ev = sunEvents(Date.UTC(2026, 2, 20), Date.UTC(2026, 2, 21), 0, 0);
    expect(ev.map((e) => e.kind)).toEqual(['rise', 'set']);
    const dayH = (ev[1]!.tMs - ev[0]!.tMs) / 3.6e6;
    // 12 h plus the refraction and semidiameter allowance (about 7 min at the equator).
    expect(dayH).toBeGreaterThan(12.05);
    expect(dayH).toBeLessThan(12.2);
    expect(Math.abs(solarElevationDeg(ev[0]!.tMs, 0, 0) + 0.833)).toBeLessThan(0.01);
  });

  it('night and sunrise on the fictional reef (8 N, 145 W, June): about 12.6 h of daylight', () => {
    const ev = sunEvents(Date.UTC(2026, 5, 10, 10), Date.UTC(2026, 5, 11, 10), 8.01, -144.93);
    const rise = ev.find((e) => e.kind === 'rise')!;
    const set = ev.find((e) => e.kind === 'set')!;
    expect((set.tMs - rise.tMs) / 3.6e6).toBeGreaterThan(12.4);
    expect((set.tMs - rise.tMs) / 3.6e6).toBeLessThan(12.9);
    expect(isSunDown(rise.tMs - 60_000, 8.01, -144.93)).toBe(true);
    expect(isSunDown(rise.tMs + 60_000, 8.01, -144.93)).toBe(false);
    expect(Math.abs(nextSunrise(rise.tMs - 3.6e6, 8.01, -144.93)! - rise.tMs)).toBeLessThan(1000);
  });

  it('no events in the polar night (80 N in December)', () => {
    expect(sunEvents(Date.UTC(2026, 11, 20), Date.UTC(2026, 11, 21), 80, 0)).toEqual([]);
    expect(nextSunrise(Date.UTC(2026, 11, 20), 80, 0)).toBeUndefined();
  });
});
