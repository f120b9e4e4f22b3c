// Analytic steady slabs (issue 5, check 7): for known NCP and NEC, an upstream state, U, h and L, the downstream
// chemistry comes (a) from the library's forward model and (b) from an independent RK4 integration along the
// path written here (dC/dx = (F_b - F_as(C(x)))/(rho h U), air-sea from the local state). The budget and the
// inverse must recover NCP within 1 % and NEC within 3 % (issue acceptance limits).
import { describe, it, expect } from 'vitest';
import { solveCarbonate } from '../carbonate/index.js';
import {
  airSeaFluxes,
  computeTransectFlux,
  forwardDownstream,
  makeTransectParams,
  type StationWindowMean,
  type TransectWindow,
} from './index.js';

const TEMP = 27.5;
const SAL = 35.1;
const TA_A = 2290;
const PCO2_A = 410;
const O2_A = 195;
const L = 350;
const H = 1.0;
const BARO = 1010;
const XCO2 = 421;
const WIND = 6; // m/s at 10 m

const dicA = (() => {
  const r = solveCarbonate({ salinity: SAL, tempC: TEMP, taUmolKg: TA_A, pco2Uatm: PCO2_A, baroHpa: BARO });
  if (!r.ok) throw new Error(r.reason);
  return r.dicUmolKg;
})();

const params = makeTransectParams({ lengthM: L, bearingDeg: 270, pq: 1.05 });

function station(o2: number, ta: number, pco2: number, taSource: 'sample' | 'salinity'): StationWindowMean {
  return {
    tempC: TEMP,
    salinity: SAL,
    o2UmolKg: o2,
    pco2Uatm: pco2,
    taUmolKg: ta,
    taSource,
    depthM: H,
    flag: 1,
  };
}

function window(
  u: number,
  down: { o2: number; ta: number; pco2: number },
  taSource: 'sample' | 'salinity',
): TransectWindow {
  return {
    tCentreMs: Date.UTC(2026, 5, 1, 12),
    up: station(O2_A, TA_A, PCO2_A, taSource),
    down: station(down.o2, taSource === 'sample' ? down.ta : TA_A, down.pco2, taSource),
    eastMS: -u, // bearing 270: flow towards the west is along the transect
    northMS: 0,
    windMS: WIND,
    windHeightM: 10,
    baroHpa: BARO,
    xco2AirPpm: XCO2,
  };
}

/** RK4 along x of (O2, TA, DIC) with the local air-sea terms; constant t, S, rho, U, h. */
function rk4Downstream(
  ncpMmolM2H: number,
  necMmolM2H: number,
  pq: number,
  u: number,
  rho: number,
  wind: boolean,
) {
  const ncp = ncpMmolM2H / 3.6;
  const nec = necMmolM2H / 3.6;
  const deriv = (y: [number, number, number]): [number, number, number] => {
    let fasO2 = 0;
    let fasCo2 = 0;
    if (wind) {
      const c = solveCarbonate({
        salinity: SAL,
        tempC: TEMP,
        taUmolKg: y[1],
        dicUmolKg: y[2],
        baroHpa: BARO,
      });
      if (!c.ok) throw new Error(c.reason);
      const as = airSeaFluxes({
        tempC: TEMP,
        salinity: SAL,
        rhoKgM3: rho,
        o2UmolKg: y[0],
        pco2Uatm: c.pco2Uatm,
        windMS: WIND,
        windHeightM: 10,
        baroHpa: BARO,
        xco2AirPpm: XCO2,
      });
      fasO2 = as.fasO2UmolM2S;
      fasCo2 = as.fasCo2UmolM2S ?? 0;
    }
    const k = 1 / (rho * H * u);
    return [(ncp - fasO2) * k, -2 * nec * k, -(ncp / pq + nec + fasCo2) * k];
  };
  let y: [number, number, number] = [O2_A, TA_A, dicA];
  const n = 200;
  const dx = L / n;
  for (let i = 0; i < n; i++) {
    const k1 = deriv(y);
    const k2 = deriv([y[0] + 0.5 * dx * k1[0], y[1] + 0.5 * dx * k1[1], y[2] + 0.5 * dx * k1[2]]);
    const k3 = deriv([y[0] + 0.5 * dx * k2[0], y[1] + 0.5 * dx * k2[1], y[2] + 0.5 * dx * k2[2]]);
    const k4 = deriv([y[0] + dx * k3[0], y[1] + dx * k3[1], y[2] + dx * k3[2]]);
    y = [
      y[0] + (dx / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]),
      y[1] + (dx / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]),
      y[2] + (dx / 6) * (k1[2] + 2 * k2[2] + 2 * k3[2] + k4[2]),
    ];
  }
  const c = solveCarbonate({ salinity: SAL, tempC: TEMP, taUmolKg: y[1], dicUmolKg: y[2], baroHpa: BARO });
  if (!c.ok) throw new Error(c.reason);
  return { o2: y[0], ta: y[1], dic: y[2], pco2: c.pco2Uatm };
}

const CASES = [
  { name: 'midday', ncp: 25, nec: 9, u: 0.05 },
  { name: 'night', ncp: -7, nec: 2, u: 0.04 },
  { name: 'dissolving night', ncp: -9, nec: -1.5, u: 0.08 },
  { name: 'fast flow', ncp: 15, nec: 6, u: 0.25 },
];

describe('steady slab: forward model -> budget and inverse (exact inverse of each other)', () => {
  for (const cs of CASES) {
    it(`${cs.name}: NCP ${cs.ncp}, NEC ${cs.nec} mmol m-2 h-1, U ${cs.u} m/s`, () => {
      const f = forwardDownstream({
        up: { tempC: TEMP, salinity: SAL, o2UmolKg: O2_A, taUmolKg: TA_A, dicUmolKg: dicA },
        ncpMmolM2H: cs.ncp,
        necMmolM2H: cs.nec,
        pq: params.pq,
        uMS: cs.u,
        depthM: H,
        lengthM: L,
        baroHpa: BARO,
        airSea: { kind: 'wind', windMS: WIND, windHeightM: 10, xco2AirPpm: XCO2 },
      });
      expect(f.ok).toBe(true);
      if (!f.ok) return;
      expect(f.upPco2Uatm).toBeCloseTo(PCO2_A, 5); // round trip through TA + DIC
      const down = { o2: f.o2UmolKg, ta: f.taUmolKg, pco2: f.pco2Uatm };
      const byTa = computeTransectFlux(window(cs.u, down, 'sample'), undefined, params);
      expect(byTa.necMethod).toBe('ta');
      expect(byTa.ncpMmolM2H).toBeCloseTo(cs.ncp, 6);
      expect(byTa.necMmolM2H).toBeCloseTo(cs.nec, 6);
      const inv = computeTransectFlux(window(cs.u, down, 'salinity'), undefined, params);
      expect(inv.necMethod).toBe('inverse');
      expect(inv.ncpMmolM2H).toBeCloseTo(cs.ncp, 6);
      expect(inv.necMmolM2H).toBeCloseTo(cs.nec, 3); // Brent tolerance 1e-4 mmol m-2 h-1
      expect(inv.notes).toContain('steady_form');
      expect(inv.flag).toBe(3); // no previous inverse solution: steady form, flag 3 (docs/methods/metabolism.md 6.5)
    });
  }
});

describe('steady slab: independent RK4 path integration -> budget and inverse', () => {
  for (const cs of CASES) {
    for (const wind of [false, true]) {
      it(`${cs.name}, ${wind ? 'with' : 'without'} gas exchange: NCP within 1 %, NEC within 3 %`, () => {
        const w0 = window(cs.u, { o2: O2_A, ta: TA_A, pco2: PCO2_A }, 'sample');
        const rho = computeTransectFlux(w0, undefined, params).rhoKgM3;
        const d = rk4Downstream(cs.ncp, cs.nec, params.pq, cs.u, rho, wind);
        const wTa = window(cs.u, d, 'sample');
        const wInv = window(cs.u, d, 'salinity');
        if (!wind) {
          delete wTa.windMS;
          delete wInv.windMS;
        }
        const byTa = computeTransectFlux(wTa, undefined, params);
        const inv = computeTransectFlux(wInv, undefined, params);
        for (const r of [byTa, inv]) {
          expect(Math.abs((r.ncpMmolM2H as number) - cs.ncp)).toBeLessThan(0.01 * Math.abs(cs.ncp));
          expect(Math.abs((r.necMmolM2H as number) - cs.nec)).toBeLessThan(0.03 * Math.abs(cs.nec));
        }
      });
    }
  }
});

describe('storage form: two windows 10 min apart, upstream water changing', () => {
  it('budget and inverse recover NCP and NEC exactly from the forward model with storage; NCP_C from DIC', () => {
    const pq = params.pq;
    const upK1 = { tempC: TEMP, salinity: SAL, o2UmolKg: O2_A, taUmolKg: TA_A, dicUmolKg: dicA };
    const upK = { ...upK1, o2UmolKg: O2_A + 4, taUmolKg: TA_A - 3, dicUmolKg: dicA + 6 };
    const common = { pq, uMS: 0.05, depthM: H, lengthM: L, baroHpa: BARO };
    const f1 = forwardDownstream({ ...common, up: upK1, ncpMmolM2H: 20, necMmolM2H: 6 });
    if (!f1.ok) throw new Error('forward failed');
    const downK1 = { ...upK1, o2UmolKg: f1.o2UmolKg, taUmolKg: f1.taUmolKg, dicUmolKg: f1.dicUmolKg };
    const f2 = forwardDownstream({
      ...common,
      up: upK,
      ncpMmolM2H: 22,
      necMmolM2H: 7,
      previous: { dtS: 600, up: upK1, down: downK1 },
    });
    if (!f2.ok) throw new Error('forward failed');
    const stationOf = (
      s: typeof upK,
      pco2: number,
      taSource: 'measured' | 'salinity',
      taUp?: number,
    ): StationWindowMean => ({
      tempC: s.tempC,
      salinity: s.salinity,
      o2UmolKg: s.o2UmolKg,
      pco2Uatm: pco2,
      taUmolKg: taUp ?? s.taUmolKg,
      dicUmolKg: s.dicUmolKg,
      taSource,
      depthM: H,
      flag: 1,
    });
    const mk = (t: number, a: StationWindowMean, b: StationWindowMean): TransectWindow => ({
      tCentreMs: t,
      up: a,
      down: b,
      eastMS: -0.05,
      northMS: 0,
      baroHpa: BARO,
    });
    const t1 = Date.UTC(2026, 5, 1, 12);
    // TA method with measured TA and DIC at both stations.
    const w1 = mk(t1, stationOf(upK1, f1.upPco2Uatm, 'measured'), stationOf(downK1, f1.pco2Uatm, 'measured'));
    const downK = { ...upK, o2UmolKg: f2.o2UmolKg, taUmolKg: f2.taUmolKg, dicUmolKg: f2.dicUmolKg };
    const w2 = mk(
      t1 + 600_000,
      stationOf(upK, f2.upPco2Uatm, 'measured'),
      stationOf(downK, f2.pco2Uatm, 'measured'),
    );
    const r2 = computeTransectFlux(w2, w1, params);
    expect(r2.notes).not.toContain('no_storage');
    expect(r2.ncpMmolM2H).toBeCloseTo(22, 8);
    expect(r2.necMmolM2H).toBeCloseTo(7, 8);
    expect(r2.ncpCMmolM2H).toBeCloseTo(22 / pq, 8);
    // Inverse: pCO2 only downstream (TA from salinity = the upstream value here), chained through window 1.
    const v1 = mk(
      t1,
      stationOf(upK1, f1.upPco2Uatm, 'salinity'),
      stationOf(downK1, f1.pco2Uatm, 'salinity', TA_A),
    );
    const i1 = computeTransectFlux(v1, undefined, params);
    expect(i1.necMmolM2H).toBeCloseTo(6, 3);
    const v2 = mk(
      t1 + 600_000,
      stationOf(upK, f2.upPco2Uatm, 'salinity'),
      stationOf(downK, f2.pco2Uatm, 'salinity', upK.taUmolKg),
    );
    const i2 = computeTransectFlux(v2, v1, params, { previousResult: i1 });
    expect(i2.notes).not.toContain('steady_form');
    expect(i2.ncpMmolM2H).toBeCloseTo(22, 8);
    expect(i2.necMmolM2H).toBeCloseTo(7, 3);
    expect(i2.inverseState?.downTaUmolKg).toBeCloseTo(f2.taUmolKg, 3);
    // Without the previous solution the steady form is used and flagged 3: a visible bias under storage.
    const i2s = computeTransectFlux(v2, v1, params);
    expect(i2s.notes).toContain('steady_form');
    expect(i2s.flag).toBe(3);
  });
});

describe('air-sea O2 mean: exact steady path mean vs the station mean (air-sea.ts)', () => {
  it('the trapezoid keeps NCP within 1 %; the default exponential weighting is closer in every case', () => {
    const trap = makeTransectParams({ lengthM: L, bearingDeg: 270, pq: 1.05, airSeaO2Mean: 'trapezoid' });
    for (const cs of CASES) {
      const w0 = window(cs.u, { o2: O2_A, ta: TA_A, pco2: PCO2_A }, 'sample');
      const rho = computeTransectFlux(w0, undefined, params).rhoKgM3;
      const d = rk4Downstream(cs.ncp, cs.nec, params.pq, cs.u, rho, true);
      const w = window(cs.u, d, 'salinity');
      const rT = computeTransectFlux(w, undefined, trap);
      const rE = computeTransectFlux(w, undefined, params);
      const errT = Math.abs((rT.ncpMmolM2H as number) - cs.ncp);
      const errE = Math.abs((rE.ncpMmolM2H as number) - cs.ncp);
      expect(errT).toBeLessThan(0.01 * Math.abs(cs.ncp));
      expect(errE).toBeLessThan(errT);
      expect(Math.abs((rE.necMmolM2H as number) - cs.nec)).toBeLessThan(
        Math.abs((rT.necMmolM2H as number) - cs.nec),
      );
    }
  });
});
