import { describe, it, expect } from 'vitest';
import {
  airSeaCo2FluxUmolM2S,
  airSeaO2FluxUmolM2S,
  gasTransferVelocity,
  gasTransferVelocityCurrent,
  k660CmH,
  schmidtNumber,
  windAt10m,
} from './gas-exchange.js';

describe('Schmidt numbers (Wanninkhof 2014)', () => {
  it('CO2 at 20 degC is about 668', () => {
    // Wanninkhof 2014, Table 1: Sc(CO2, seawater, 20 degC) = 668 (from memory).
    expect(schmidtNumber('CO2', 20)).toBeCloseTo(668.344, 2);
  });
  it('O2 at 20 degC is about 568', () => {
    // Wanninkhof 2014, Table 1: Sc(O2, seawater, 20 degC) = 568 (from memory).
    expect(schmidtNumber('O2', 20)).toBeCloseTo(568.2, 1);
  });
  it('falls with temperature and crosses 660 for CO2 near 20 degC', () => {
    // Common practice: Sc of CO2 in seawater is 660 at about 20 degC (the reason for the k660 normalisation).
    expect(schmidtNumber('CO2', 20.0)).toBeGreaterThan(660);
    expect(schmidtNumber('CO2', 20.5)).toBeLessThan(660);
    expect(schmidtNumber('CO2', 28)).toBeLessThan(schmidtNumber('CO2', 20));
    // Wanninkhof 2014 Table 1 lists Sc(CO2, 30 degC) near 400 (from memory).
    expect(schmidtNumber('CO2', 30)).toBeGreaterThan(380);
    expect(schmidtNumber('CO2', 30)).toBeLessThan(420);
  });
});

describe('gas transfer velocity', () => {
  it('k660 at U10 = 10 m/s is 25.1 cm/h by definition of the fit (Wanninkhof 2014)', () => {
    expect(k660CmH(10)).toBeCloseTo(25.1, 10);
  });
  it('k(CO2, 20 degC, 10 m/s) = 25.1 (668.3/660)^-0.5 cm/h (algebra on Wanninkhof 2014)', () => {
    const kCmH = gasTransferVelocity('CO2', 20, 10) * 3.6e5;
    expect(kCmH).toBeCloseTo(24.943, 2);
  });
  it('O2 transfers faster than CO2 at the same wind (smaller Sc; common practice)', () => {
    expect(gasTransferVelocity('O2', 27, 6)).toBeGreaterThan(gasTransferVelocity('CO2', 27, 6));
  });
  it('U10 from an anemometer at 3 m by the 0.11 power law (Hsu et al. 1994)', () => {
    expect(windAt10m(5, 3)).toBeCloseTo(5 * Math.pow(10 / 3, 0.11), 12);
    expect(windAt10m(5, 3)).toBeCloseTo(5.708, 3);
    expect(windAt10m(5, 10)).toBe(5);
  });
  it('Borges et al. 2004 current term: k600 = 6.436 cm/h at U = 10 cm/s, h = 1 m, no wind (algebra)', () => {
    const k = gasTransferVelocityCurrent('CO2', 20, 0, 0.1, 1) * 3.6e5;
    expect(k).toBeCloseTo(6.436 * Math.pow(schmidtNumber('CO2', 20) / 600, -0.5), 3);
  });
});

describe('air-sea fluxes', () => {
  it('O2: k rho (O2 - O2*) (algebra)', () => {
    expect(airSeaO2FluxUmolM2S(1e-5, 1025, 220, 200)).toBeCloseTo(0.205, 12);
    expect(airSeaO2FluxUmolM2S(1e-5, 1025, 180, 200)).toBeCloseTo(-0.205, 12);
  });
  it('CO2: k rho K0 (fCO2_w - fCO2_a) (algebra)', () => {
    expect(airSeaCo2FluxUmolM2S(1e-5, 1025, 0.0284, 500, 400)).toBeCloseTo(0.02911, 5);
  });
});
