import { describe, it, expect } from 'vitest';
import {
  advectionRate,
  benthicFluxUmolM2S,
  fluxSigmaUmolM2S,
  forwardSteady,
  forwardWithStorage,
  storageFraction,
  storageRate,
} from './budget.js';

describe('budget algebra (docs/methods/metabolism.md 6.1, 6.3)', () => {
  it('advection and storage terms', () => {
    expect(advectionRate(0.05, 200, 207, 350)).toBeCloseTo(1e-3, 15);
    expect(storageRate(202, 208, 200, 206, 600)).toBeCloseTo(2 / 600, 15);
    expect(benthicFluxUmolM2S(1025, 1, 0, 1e-3, 0.1)).toBeCloseTo(1.125, 12);
    expect(storageFraction(1, 3)).toBe(0.25);
    expect(storageFraction(0, 0)).toBe(0);
  });

  it('steady forward model inverts the budget exactly', () => {
    const rho = 1023;
    const h = 1.2;
    const F = 2.5; // umol m-2 s-1
    const cB = forwardSteady(200, F / (rho * h), 0.04, 350);
    const back = benthicFluxUmolM2S(rho, h, 0, advectionRate(0.04, 200, cB, 350), 0);
    expect(back).toBeCloseTo(F, 12);
  });

  it('storage forward model makes the discrete budget of each window exact and forgets errors', () => {
    const rho = 1024;
    const h = 0.9;
    const U = 0.05;
    const L = 350;
    const W = 600;
    const run = (cB0: number) => {
      let cAprev = 200;
      let cBprev = cB0;
      for (let k = 1; k <= 40; k++) {
        const cA = 200 + 5 * Math.sin(k / 5);
        const F = 3 + Math.cos(k / 7);
        const cB = forwardWithStorage(cA, cAprev, cBprev, F / (rho * h), U, L, W);
        const st = storageRate(cA, cB, cAprev, cBprev, W);
        const ad = advectionRate(U, cA, cB, L);
        expect(benthicFluxUmolM2S(rho, h, st, ad, 0)).toBeCloseTo(F, 10);
        cAprev = cA;
        cBprev = cB;
      }
      return cBprev;
    };
    // Two starts 20 umol/kg apart: the difference decays by tau/(tau + 2W) per step (docs/methods/metabolism.md 6.4),
    // tau = L/U = 7000 s, 2W = 1200 s.
    const ratio = (run(230) - run(210)) / 20;
    expect(ratio).toBeCloseTo(Math.pow(7000 / 8200, 40), 12);
  });

  it('flux sigma reduces to the gradient term alone (docs/methods/uncertainty.md 9.2)', () => {
    const s = fluxSigmaUmolM2S({
      rhoKgM3: 1000,
      depthM: 1,
      uMS: 0.05,
      lengthM: 500,
      dC: 10,
      storage: 0,
      advection: 0.001,
      sigmaStorage: 0,
      sigmaUMS: 0,
      sigmaDC: 2,
      sigmaLengthM: 0,
      sigmaDepthM: 0,
      sigmaAirSeaUmolM2S: 0,
    });
    expect(s).toBeCloseTo(1000 * (0.05 / 500) * 2, 12);
    const s2 = fluxSigmaUmolM2S({
      rhoKgM3: 1000,
      depthM: 1,
      uMS: 0.05,
      lengthM: 500,
      dC: 10,
      storage: 0,
      advection: 0.001,
      sigmaStorage: 0,
      sigmaUMS: 0.005,
      sigmaDC: 0,
      sigmaLengthM: 0,
      sigmaDepthM: 0.1,
      sigmaAirSeaUmolM2S: 0,
    });
    // 10 % of U and 10 % of h, in quadrature, on F = 1 umol m-2 s-1.
    expect(s2).toBeCloseTo(Math.sqrt(0.1 ** 2 + 0.1 ** 2), 12);
  });
});
