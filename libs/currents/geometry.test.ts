import { describe, expect, it } from 'vitest';
import {
  binHeightM,
  binRangeM,
  boundaryDistanceM,
  depthFromPressureM,
  sideLobeMaxRangeM,
} from './geometry.js';

describe('bin geometry (docs/methods/currents.md 5.3)', () => {
  it('r_n = blank + dz/2 + (n - 1) dz: blank 0.1, dz 0.2, third bin at 0.6 m (worked by hand)', () => {
    expect(binRangeM(2, 0.1, 0.2)).toBeCloseTo(0.6, 15);
    expect(binRangeM(0, 0.1, 0.2, 0.25)).toBe(0.25);
  });

  it('z_n = z_head + r cos p cos r up-looking, minus down-looking (worked by hand)', () => {
    expect(binHeightM(1, 0.35, 'up')).toBeCloseTo(1.35, 15);
    expect(binHeightM(1, 1.5, 'down')).toBeCloseTo(0.5, 15);
    // pitch 5 deg: cos 5 = 0.9961947; the 0.4 % bound of docs/methods/currents.md 5.3
    const z = binHeightM(1, 0, 'up', 5, 0);
    expect(z).toBeCloseTo(0.9961947, 7);
    expect(1 - z).toBeLessThan(0.004);
  });

  it('side lobes at theta = 25 deg lose D (1 - cos theta) = 9.4 % of D (docs/methods/currents.md 5.3)', () => {
    const d = 10;
    const lost = d - sideLobeMaxRangeM(d, 25);
    expect(lost / d).toBeCloseTo(0.0937, 4);
    expect(Math.round((1000 * lost) / d) / 10).toBe(9.4);
    // theta = 20 deg loses 6.0 % (1 - cos 20 = 0.0603; worked by hand)
    expect(1 - sideLobeMaxRangeM(1, 20)).toBeCloseTo(0.0603, 4);
  });

  it('the boundary is the surface (troughs with waves) up-looking and the bed down-looking (definition)', () => {
    expect(boundaryDistanceM('up', 0.35, 2.35)).toBeCloseTo(2, 15);
    expect(boundaryDistanceM('up', 0.35, 2.35, 0.6)).toBeCloseTo(1.7, 15);
    expect(boundaryDistanceM('down', 1.5, 3, 0.6)).toBe(1.5);
  });

  it('hydrostatic depth: 1.025 dbar of sea pressure at rho 1025, g 10 is 1 m above the head (worked by hand)', () => {
    expect(depthFromPressureM(10.1325 + 1.025, 10.1325, 1025, 10, 0.35)).toBeCloseTo(1.35, 12);
  });
});
