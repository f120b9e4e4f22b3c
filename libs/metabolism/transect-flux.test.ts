// Validity, flags, reverse flow and first-order uncertainty of computeTransectFlux
// (docs/methods/metabolism.md 6.6; docs/methods/uncertainty.md 9.2).
import { describe, it, expect } from 'vitest';
import { solveCarbonate } from '../carbonate/index.js';
import {
  computeTransectFlux,
  forwardDownstream,
  inverseNecSigma,
  inverseNecSigmaSplit,
  makeTransectParams,
  solveInverseNec,
  type InverseInput,
  type StationWindowMean,
  type TransectWindow,
} from './index.js';

const T0 = Date.UTC(2026, 5, 1, 12);
const params = makeTransectParams({ lengthM: 400, bearingDeg: 270 });

function st(o2: number, extra: Partial<StationWindowMean> = {}): StationWindowMean {
  return {
    tempC: 27,
    salinity: 35,
    o2UmolKg: o2,
    pco2Uatm: 400,
    taUmolKg: 2300,
    taSource: 'salinity',
    depthM: 1,
    flag: 1,
    ...extra,
  };
}

function win(over: Partial<TransectWindow> = {}): TransectWindow {
  return { tCentreMs: T0, up: st(200), down: st(210, { pco2Uatm: 380 }), eastMS: -0.05, northMS: 0, ...over };
}

describe('validity (docs/methods/metabolism.md 6.6)', () => {
  it('a clean window is valid, flag 1 for the O2 budget', () => {
    const prev = win({ tCentreMs: T0 - 600_000 });
    const r = computeTransectFlux(win(), prev, params);
    expect(r.valid).toBe(true);
    expect(r.invalidReasons).toEqual([]);
    expect(r.uMS).toBeCloseTo(0.05, 12);
    expect(r.residenceMin).toBeCloseTo(400 / 0.05 / 60, 10);
    expect(r.depthM).toBe(1);
    // NCP = rho h U dO2/L (no wind, no storage): 1023.x * 1 * 0.05 * 10/400 umol m-2 s-1 x 3.6
    expect(r.ncpMmolM2H).toBeCloseTo(r.rhoKgM3 * 0.05 * (10 / 400) * 3.6, 10);
    expect(r.necMethod).toBe('inverse');
  });

  it('met inputs: full met gives flag 1; configured xCO2 flag 2; defaulted barometer flag 3', () => {
    const prev = win({ tCentreMs: T0 - 600_000 });
    const met = { windMS: 6, windHeightM: 4, baroHpa: 1011, xco2AirPpm: 425 };
    const full = computeTransectFlux(win(met), prev, params, {
      previousResult: computeTransectFlux(prev, undefined, params),
    });
    expect(full.flag).toBe(1);
    expect(full.airSea?.u10MS).toBeCloseTo(6 * Math.pow(10 / 4, 0.11), 12);
    expect(full.airSea?.fasO2MmolM2H).toBeGreaterThan(0); // 205 umol/kg is above saturation at 27 degC
    const { xco2AirPpm: _x, ...noXco2 } = met;
    const r2 = computeTransectFlux(win(noXco2), prev, params, { previousResult: full });
    expect(r2.notes).toContain('xco2_configured');
    expect(r2.flag).toBe(2);
    const { baroHpa: _b, ...noBaro } = met;
    const r3 = computeTransectFlux(win(noBaro), prev, params, { previousResult: full });
    expect(r3.notes).toContain('no_baro');
    expect(r3.flag).toBe(3);
  });

  it('slow flow, long residence, shallow water', () => {
    const r = computeTransectFlux(win({ eastMS: -0.015 }), undefined, params);
    expect(r.valid).toBe(false);
    expect(r.invalidReasons).toContain('speed_below_min');
    expect(r.invalidReasons).toContain('residence_above_max'); // 400/0.015 s = 7.4 h > 4 h
    const r2 = computeTransectFlux(win({ up: st(200, { depthM: 0.15 }) }), undefined, params);
    expect(r2.invalidReasons).toEqual(['depth_below_min']);
    expect(r2.flag).toBe(3);
  });

  it('flow 35 deg off the transect is invalid with flag 3, 60 deg with flag 4', () => {
    const d = (b: number) => ({
      eastMS: 0.05 * Math.sin((b * Math.PI) / 180),
      northMS: 0.05 * Math.cos((b * Math.PI) / 180),
    });
    const ok = computeTransectFlux(win(d(295)), undefined, params);
    expect(ok.angleOffDeg).toBeCloseTo(25, 10);
    expect(ok.invalidReasons).not.toContain('angle_off_transect');
    const r35 = computeTransectFlux(win(d(305)), undefined, params);
    expect(r35.invalidReasons).toContain('angle_off_transect');
    expect(r35.flag).toBe(3);
    const r60 = computeTransectFlux(win(d(330)), undefined, params);
    expect(r60.flag).toBe(4);
  });

  it('reverse flow: flagged, or the stations swap roles when configured', () => {
    const w = win({ eastMS: 0.05, up: st(210), down: st(200) }); // water flows from "down" to "up"
    const flagged = computeTransectFlux(w, undefined, params);
    expect(flagged.invalidReasons).toContain('reverse_flow');
    expect(flagged.uMS).toBeCloseTo(-0.05, 12);
    const swapped = computeTransectFlux(
      w,
      undefined,
      makeTransectParams({ lengthM: 400, bearingDeg: 270, swapOnReverse: true }),
    );
    expect(swapped.swapped).toBe(true);
    expect(swapped.valid).toBe(true);
    expect(swapped.uMS).toBeCloseTo(0.05, 12);
    // Water gains 10 umol/kg O2 crossing the flat in either direction: the same positive NCP.
    expect(swapped.ncpMmolM2H).toBeCloseTo(swapped.rhoKgM3 * 0.05 * (10 / 400) * 3.6, 10);
  });

  it('storage dominating the advection invalidates the window', () => {
    // Both stations rose 5 umol/kg in 10 min: St = 5/600 vs Ad = 0.05*10/400 = 1/800 -> fraction 0.87.
    const prev = win({ tCentreMs: T0 - 600_000, up: st(195), down: st(205) });
    const r = computeTransectFlux(win(), prev, params);
    expect(r.storageFractionO2).toBeCloseTo(5 / 600 / (5 / 600 + 1 / 800), 10);
    expect(r.invalidReasons).toContain('storage_dominates');
    // A previous window older than maxPreviousGapMin gives no storage term.
    const old = computeTransectFlux(win(), { ...prev, tCentreMs: T0 - 3 * 3_600_000 }, params);
    expect(old.notes).toContain('no_storage');
    expect(old.storageFractionO2).toBeNull();
  });

  it('with the next window, the storage term is centred and the steadiness test does not apply', () => {
    // O2 peaks at this window: 195/205 before, 200/210 now, 195/205 after. Centred: St = 0, the budget is
    // advection alone; backward: St = 5/600, storage dominates.
    const prev = win({ tCentreMs: T0 - 600_000, up: st(195), down: st(205) });
    const next = win({ tCentreMs: T0 + 600_000, up: st(195), down: st(205) });
    const r = computeTransectFlux(win(), prev, params, { next });
    expect(r.notes).toContain('storage_centred');
    expect(r.storageFractionO2).toBeCloseTo(0, 12);
    expect(r.valid).toBe(true);
    expect(r.ncpMmolM2H).toBeCloseTo(r.rhoKgM3 * 0.05 * (10 / 400) * 3.6, 10);
    // A steep rise through the window: centred St = 10/1200 still dominates, yet the window is valid.
    const rise = computeTransectFlux(win(), prev, params, { next: { ...next, up: st(205), down: st(215) } });
    expect(rise.storageFractionO2 as number).toBeGreaterThan(0.5);
    expect(rise.invalidReasons).toEqual([]);
    // A next window further than maxPreviousGapMin away is not used.
    const far = computeTransectFlux(win(), prev, params, {
      next: { ...next, tCentreMs: T0 + 3 * 3_600_000 },
    });
    expect(far.notes).not.toContain('storage_centred');
    expect(far.invalidReasons).toContain('storage_dominates');
  });

  it('QC-failed or missing inputs give null values and the reason', () => {
    const bad = computeTransectFlux(win({ up: st(200, { o2Flag: 4 }) }), undefined, params);
    expect(bad.ncpMmolM2H).toBeNull();
    expect(bad.necMmolM2H).toBeNull();
    expect(bad.invalidReasons).toContain('input_qc_failed');
    const missing = computeTransectFlux(win({ down: st(210, { flag: 9 }) }), undefined, params);
    expect(missing.invalidReasons).toContain('input_missing');
    expect(missing.valid).toBe(false);
    const co2bad = computeTransectFlux(win({ down: st(210, { pco2Flag: 4 }) }), undefined, params);
    expect(co2bad.ncpMmolM2H).not.toBeNull();
    expect(co2bad.necMmolM2H).toBeNull();
  });

  it('non-finite inputs count as missing: null values, never NaN', () => {
    const r = computeTransectFlux(win({ up: st(200, { depthM: Number.NaN }) }), undefined, params);
    expect(r.ncpMmolM2H).toBeNull();
    expect(r.necMmolM2H).toBeNull();
    expect(r.flag).toBe(9);
    expect(r.invalidReasons).toContain('input_missing');
    const o2 = computeTransectFlux(win({ down: st(Number.NaN) }), undefined, params);
    expect(o2.ncpMmolM2H).toBeNull();
    expect(o2.flag).toBe(9);
  });

  it('no NEC root gives null NEC, a stable code and flag 4', () => {
    const r = computeTransectFlux(win({ down: st(210, { pco2Uatm: 0.5 }) }), undefined, params);
    expect(r.necMethod).toBe('inverse');
    expect(r.necMmolM2H).toBeNull();
    expect(r.necFailure?.code).toBe('REEFD_METABOLISM_NEC_NO_ROOT');
    expect(r.notes).toContain('nec_no_root');
    expect(r.flag).toBe(4);
  });
});

describe('uncertainty (docs/methods/uncertainty.md 9.2)', () => {
  it('NCP sigma from the O2 difference alone: rho h (U/L) sigma_dC', () => {
    const w = win({
      sigmaUMS: 0,
      up: st(200, { sigmaO2UmolKg: 1, sigmaDepthM: 0 }),
      down: st(210, { sigmaO2UmolKg: 1, sigmaDepthM: 0 }),
    });
    const r = computeTransectFlux(w, undefined, params);
    expect(r.sigmaNcpMmolM2H).toBeCloseTo(r.rhoKgM3 * (0.05 / 400) * Math.SQRT2 * 3.6, 10);
  });

  it('NCP sigma from U alone: 10 % of U is 10 % of the advective NCP', () => {
    const w = win({
      sigmaUMS: 0.005,
      up: st(200, { sigmaO2UmolKg: 0, sigmaDepthM: 0 }),
      down: st(210, { sigmaO2UmolKg: 0, sigmaDepthM: 0 }),
    });
    const r = computeTransectFlux(w, undefined, params);
    expect(r.sigmaNcpMmolM2H).toBeCloseTo(0.1 * (r.ncpMmolM2H as number), 10);
  });

  it('inverse NEC sigma by the implicit-function derivative equals a brute-force re-solve', () => {
    const c = solveCarbonate({ salinity: 35, tempC: 27, taUmolKg: 2300, pco2Uatm: 400 });
    if (!c.ok) throw new Error(c.reason);
    const f = forwardDownstream({
      up: { tempC: 27, salinity: 35, o2UmolKg: 200, taUmolKg: 2300, dicUmolKg: c.dicUmolKg },
      ncpMmolM2H: 20,
      necMmolM2H: 7,
      pq: 1,
      uMS: 0.05,
      depthM: 1,
      lengthM: 400,
    });
    if (!f.ok) throw new Error('forward failed');
    const x: InverseInput = {
      upTempC: 27,
      upSalinity: 35,
      upPco2Uatm: 400,
      upTaUmolKg: 2300,
      downTempC: 27,
      downSalinity: 35,
      downPco2Uatm: f.pco2Uatm,
      o2StorageUmolKgS: 0,
      o2DiffUmolKg: f.o2UmolKg - 200,
      fasO2UmolM2S: 0,
      ncpOffsetUmolM2S: 0,
      pq: 1,
      fasCo2UmolM2S: 0,
      uMS: 0.05,
      depthM: 1,
      rhoKgM3: f.rhoKgM3,
      lengthM: 400,
      baroHpa: 1013.25,
    };
    const o = { bracketMmolM2H: 100, maxDoublings: 3, tolMmolM2H: 1e-7 };
    const r = solveInverseNec(x, o);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.necUmolM2S * 3.6).toBeCloseTo(7, 5);
    expect(r.dgdN).toBeGreaterThan(0); // g increases with N (Frankignoulle et al. 1994)
    for (const [key, s] of [
      ['downPco2Uatm', 2],
      ['upPco2Uatm', 2],
      ['uMS', 0.005],
      ['pq', 0.1],
      ['upTaUmolKg', 10],
      ['dpK1', 0.0075],
      ['dBtRel', 0.02],
    ] as const) {
      const sig = inverseNecSigma(x, r.necUmolM2S, r.dgdN, { [key]: s });
      const plus = solveInverseNec({ ...x, [key]: (x[key] ?? 0) + s }, o);
      const minus = solveInverseNec({ ...x, [key]: (x[key] ?? 0) - s }, o);
      if (!plus.ok || !minus.ok) throw new Error('re-solve failed');
      const brute = Math.abs(plus.necUmolM2S - minus.necUmolM2S) / 2;
      expect(Math.abs(sig.sigmaUmolM2S - brute)).toBeLessThan(0.02 * brute + 1e-6);
      expect(sig.sigmaUmolM2S).toBeGreaterThan(0);
    }
    // Shared constants largely cancel in the station difference (docs/methods/uncertainty.md 9.1): pK1 +-0.0075 moves NEC far
    // less than a 2 uatm pCO2 inter-calibration error does.
    const k1 = inverseNecSigma(x, r.necUmolM2S, r.dgdN, { dpK1: 0.0075 }).sigmaUmolM2S;
    const pB = inverseNecSigma(x, r.necUmolM2S, r.dgdN, { downPco2Uatm: 2 }).sigmaUmolM2S;
    expect(k1).toBeLessThan(0.2 * pB);
  });

  it('an error that persists from window to window moves the storage-form NEC as the steady form says', () => {
    // A chain of windows 30 min apart on a steady slab (NEC 7, NCP 20 mmol m-2 h-1, U 0.05 m/s, L 400 m): each
    // window's inverse starts its storage form from the previous one's solution, as the processor chains them.
    const c = solveCarbonate({ salinity: 35, tempC: 27, taUmolKg: 2300, pco2Uatm: 400 });
    if (!c.ok) throw new Error(c.reason);
    const f = forwardDownstream({
      up: { tempC: 27, salinity: 35, o2UmolKg: 200, taUmolKg: 2300, dicUmolKg: c.dicUmolKg },
      ncpMmolM2H: 20,
      necMmolM2H: 7,
      pq: 1,
      uMS: 0.05,
      depthM: 1,
      lengthM: 400,
    });
    if (!f.ok) throw new Error('forward failed');
    const base: InverseInput = {
      upTempC: 27,
      upSalinity: 35,
      upPco2Uatm: 400,
      upTaUmolKg: 2300,
      downTempC: 27,
      downSalinity: 35,
      downPco2Uatm: f.pco2Uatm,
      o2StorageUmolKgS: 0,
      o2DiffUmolKg: f.o2UmolKg - 200,
      fasO2UmolM2S: 0,
      ncpOffsetUmolM2S: 0,
      pq: 1,
      fasCo2UmolM2S: 0,
      uMS: 0.05,
      depthM: 1,
      rhoKgM3: f.rhoKgM3,
      lengthM: 400,
      baroHpa: 1013.25,
    };
    const o = { bracketMmolM2H: 100, maxDoublings: 3, tolMmolM2H: 1e-7 };
    /** The last window of a 40-window chain whose every window carries the shift. */
    const chain = (shift: Partial<InverseInput>) => {
      let previous: InverseInput['previous'];
      let last: { x: InverseInput; r: Extract<ReturnType<typeof solveInverseNec>, { ok: true }> } | undefined;
      for (let k = 0; k < 40; k++) {
        const x: InverseInput = { ...base, ...shift, ...(previous ? { previous } : {}) };
        const r = solveInverseNec(x, o);
        if (!r.ok) throw new Error(r.reason);
        previous = {
          dtS: 1800,
          upTaUmolKg: x.upTaUmolKg,
          upDicUmolKg: r.upDicUmolKg,
          upSalinity: 35,
          downTaUmolKg: r.downTaUmolKg,
          downDicUmolKg: r.downDicUmolKg,
          downSalinity: 35,
        };
        last = { x, r };
      }
      return last!;
    };
    const { x, r } = chain({});
    expect(x.previous).toBeDefined();
    for (const [key, s] of [
      ['downPco2Uatm', 2],
      ['upPco2Uatm', 2],
      ['dpK1', 0.0075],
      ['downTempC', 0.01],
    ] as const) {
      // brute force: the same error in every window of the chain
      const plus = chain({ [key]: (base[key] ?? 0) + s }).r.necUmolM2S;
      const minus = chain({ [key]: (base[key] ?? 0) - s }).r.necUmolM2S;
      const brute = Math.abs(plus - minus) / 2;
      const split = inverseNecSigmaSplit(x, r.necUmolM2S, r.dgdN, { [key]: s }, {}).sigmaUmolM2S;
      expect(Math.abs(split - brute), key).toBeLessThan(0.02 * brute + 1e-6);
    }
    // The partial of the storage form alone takes such an error for a change between two windows: for the
    // downstream pCO2 it is (1/(2 dt) + U/L)/(U/L) = 3.2 times too large here, and the shared constants no
    // longer cancel.
    for (const [key, s] of [
      ['downPco2Uatm', 2],
      ['dpK1', 0.0075],
    ] as const) {
      const oneWindow = inverseNecSigma(x, r.necUmolM2S, r.dgdN, { [key]: s }).sigmaUmolM2S;
      const split = inverseNecSigmaSplit(x, r.necUmolM2S, r.dgdN, { [key]: s }, {}).sigmaUmolM2S;
      expect(oneWindow, key).toBeGreaterThan(2 * split);
    }
    // The random part keeps the storage form's partial: an error of this window's mean alone.
    const rnd = inverseNecSigmaSplit(x, r.necUmolM2S, r.dgdN, {}, { downPco2Uatm: 1 }).sigmaUmolM2S;
    expect(rnd).toBeCloseTo(inverseNecSigma(x, r.necUmolM2S, r.dgdN, { downPco2Uatm: 1 }).sigmaUmolM2S, 12);
  });

  it('computeTransectFlux reports a finite inverse NEC sigma that grows with the pCO2 uncertainty', () => {
    const a = computeTransectFlux(
      win({ down: st(210, { pco2Uatm: 380, sigmaPco2Uatm: 1 }), up: st(200, { sigmaPco2Uatm: 1 }) }),
      undefined,
      params,
    );
    const b = computeTransectFlux(
      win({ down: st(210, { pco2Uatm: 380, sigmaPco2Uatm: 5 }), up: st(200, { sigmaPco2Uatm: 5 }) }),
      undefined,
      params,
    );
    expect(a.sigmaNecMmolM2H).not.toBeNull();
    expect(b.sigmaNecMmolM2H as number).toBeGreaterThan(a.sigmaNecMmolM2H as number);
    const noSig = computeTransectFlux(win(), undefined, params, { uncertainty: false });
    expect(noSig.sigmaNecMmolM2H).toBeNull();
    expect(noSig.necMmolM2H).toBeCloseTo(a.necMmolM2H as number, 8);
  });
});
