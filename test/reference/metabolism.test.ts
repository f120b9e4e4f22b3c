// libs/metabolism against an outside carbonate library: steady slabs whose downstream chemistry comes from
// PyCO2SYS 1.8.3.4 and gsw 3.6 (test/reference/metabolism/generate.py). The library's budget, inverse and
// forward model must agree with them. Tolerances: the libraries differ in density (EOS-80 here, TEOS-10 there:
// < 1e-4 relative) and in KW and the fugacity factor (sub-0.1 uatm pCO2 effects), not in the method.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  computeTransectFlux,
  forwardDownstream,
  makeTransectParams,
  type StationWindowMean,
} from '../../libs/metabolism/index.js';

interface Chem {
  ta: number;
  dic: number;
  pco2: number;
  o2: number;
}
interface Case {
  temp: number;
  sal: number;
  u: number;
  h: number;
  length_m: number;
  ncp: number;
  nec: number;
  pq: number;
  rho_teos10: number;
  up: Chem;
  down: Chem;
}
const doc = JSON.parse(readFileSync(new URL('./vectors/metabolism.json', import.meta.url), 'utf8')) as {
  source: string;
  cases: Case[];
};

function station(c: Case, x: Chem, taSource: 'sample' | 'salinity'): StationWindowMean {
  return {
    tempC: c.temp,
    salinity: c.sal,
    o2UmolKg: x.o2,
    pco2Uatm: x.pco2,
    taUmolKg: taSource === 'sample' ? x.ta : c.up.ta,
    taSource,
    depthM: c.h,
    flag: 1,
  };
}

describe(`metabolism reference (${doc.source})`, () => {
  it('has the full grid', () => {
    expect(doc.cases.length).toBe(96);
  });

  it('O2 and TA budgets recover NCP and NEC (density difference only: < 2e-4 relative)', () => {
    for (const c of doc.cases) {
      const params = makeTransectParams({ lengthM: c.length_m, bearingDeg: 90, pq: c.pq });
      const w = {
        tCentreMs: 0,
        up: station(c, c.up, 'sample'),
        down: station(c, c.down, 'sample'),
        eastMS: c.u,
        northMS: 0,
      };
      const r = computeTransectFlux(w, undefined, params);
      expect(r.necMethod).toBe('ta');
      expect(Math.abs((r.ncpMmolM2H as number) / c.ncp - 1)).toBeLessThan(2e-4);
      expect(Math.abs((r.necMmolM2H as number) / c.nec - 1)).toBeLessThan(2e-4);
      expect(Math.abs(r.rhoKgM3 / c.rho_teos10 - 1)).toBeLessThan(1e-4);
    }
  });

  it('the pCO2 + O2 inverse recovers NEC from PyCO2SYS pCO2 within 0.5 % (issue limit 3 %)', () => {
    let worst = 0;
    for (const c of doc.cases) {
      const params = makeTransectParams({ lengthM: c.length_m, bearingDeg: 90, pq: c.pq });
      const w = {
        tCentreMs: 0,
        up: station(c, c.up, 'salinity'),
        down: station(c, c.down, 'salinity'),
        eastMS: c.u,
        northMS: 0,
      };
      const r = computeTransectFlux(w, undefined, params);
      expect(r.necMethod).toBe('inverse');
      const err = Math.abs((r.necMmolM2H as number) - c.nec);
      worst = Math.max(worst, err / Math.abs(c.nec));
      expect(err).toBeLessThan(0.005 * Math.abs(c.nec)); // measured worst 0.2 %
    }
    expect(worst).toBeGreaterThan(0); // the two carbonate libraries are really different
  });

  it('the forward model reproduces the downstream pCO2 of PyCO2SYS and its change along the flat', () => {
    for (const c of doc.cases) {
      const f = forwardDownstream({
        up: { tempC: c.temp, salinity: c.sal, o2UmolKg: c.up.o2, taUmolKg: c.up.ta, dicUmolKg: c.up.dic },
        ncpMmolM2H: c.ncp,
        necMmolM2H: c.nec,
        pq: c.pq,
        uMS: c.u,
        depthM: c.h,
        lengthM: c.length_m,
      });
      expect(f.ok).toBe(true);
      if (!f.ok) continue;
      // Absolute pCO2 differs by the constants' offset (already ~0.09 uatm upstream, from PyCO2SYS's DIC);
      // the change along the transect, which carries the metabolism, agrees far better.
      expect(Math.abs(f.pco2Uatm - c.down.pco2)).toBeLessThan(0.2);
      const swingDiff = f.pco2Uatm - f.upPco2Uatm - (c.down.pco2 - c.up.pco2);
      expect(Math.abs(swingDiff)).toBeLessThan(0.03 + 1e-3 * Math.abs(c.down.pco2 - c.up.pco2));
      expect(Math.abs(f.o2UmolKg - c.down.o2)).toBeLessThan(1e-4 * Math.abs(c.down.o2 - c.up.o2) + 1e-9);
    }
  });
});
