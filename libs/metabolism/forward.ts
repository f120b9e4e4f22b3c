// Forward model of the transect (docs/methods/metabolism.md 6.4): the downstream O2, TA, DIC and pCO2 for given NCP, NEC, PQ,
// velocity, depth and length, steady or with storage. It is the exact inverse of the discrete budget of
// transect-flux.ts (same salinity normalisation, same transect-mean air-sea terms), used by the simulator and
// in tests. Carbonate speciation from libs/carbonate (pCO2 from TA and DIC).

import { airSeaFluxes, pathMeanWeight } from './air-sea.js';
import { forwardSteady, forwardWithStorage, UMOL_M2_S_TO_MMOL_M2_H } from './budget.js';
import { constantsAt, densityKgM3, solveTaDic, STATE, STATE_LENGTH } from './chem.js';

export interface ForwardStation {
  tempC: number;
  salinity: number;
  o2UmolKg: number;
  taUmolKg: number;
  dicUmolKg: number;
}

export type ForwardAirSea =
  | { kind: 'fixed'; fasO2MmolM2H: number; fasCo2MmolM2H: number }
  | {
      kind: 'wind';
      windMS: number;
      windHeightM?: number;
      xco2AirPpm: number;
      /** Transect-mean O2 of the exchange term, as TransectParams.airSeaO2Mean (default 'exponential'). */
      o2Mean?: 'exponential' | 'trapezoid';
    };

export interface ForwardInput {
  up: ForwardStation;
  /** Downstream temperature and salinity (default: those upstream). */
  downTempC?: number;
  downSalinity?: number;
  ncpMmolM2H: number;
  necMmolM2H: number;
  /** Photosynthetic quotient, mol O2 per mol C. */
  pq: number;
  uMS: number;
  /** Mean depth of the transect [m]. */
  depthM: number;
  lengthM: number;
  /** Barometric pressure [hPa] (pCO2 <-> fCO2, O2 solubility); default 1013.25. */
  baroHpa?: number;
  /** Air-sea exchange: fixed fluxes, or computed from the wind on the transect means (iterated). Default none. */
  airSea?: ForwardAirSea;
  /** Previous window (storage form), dtS seconds earlier. */
  previous?: { dtS: number; up: ForwardStation; down: ForwardStation };
}

export type ForwardResult =
  | {
      ok: true;
      o2UmolKg: number;
      taUmolKg: number;
      dicUmolKg: number;
      pco2Uatm: number;
      phTotal: number;
      upPco2Uatm: number;
      fasO2MmolM2H: number;
      fasCo2MmolM2H: number;
      rhoKgM3: number;
      residenceMin: number;
    }
  | { ok: false; code: 'REEFD_METABOLISM_CARBONATE_FAILED'; reason: string };

/**
 * Downstream chemistry of a transect. All rates are the contract's: NCP mmol O2 m-2 h-1, NEC mmol CaCO3 m-2 h-1.
 * Check: with no air-sea term, O2_B - O2_A = NCP L/(3.6 rho h U) exactly (docs/methods/metabolism.md 6.4).
 */
export function forwardDownstream(x: ForwardInput): ForwardResult {
  const tB = x.downTempC ?? x.up.tempC;
  const sB = x.downSalinity ?? x.up.salinity;
  const s0 = 0.5 * (x.up.salinity + sB);
  const rho = 0.5 * (densityKgM3(x.up.salinity, x.up.tempC) + densityKgM3(sB, tB));
  const rh = rho * x.depthM;
  const ncp = x.ncpMmolM2H / UMOL_M2_S_TO_MMOL_M2_H;
  const nec = x.necMmolM2H / UMOL_M2_S_TO_MMOL_M2_H;
  const baro = x.baroHpa ?? 1013.25;
  const state = new Float64Array(STATE_LENGTH);
  const cUp = constantsAt(x.up.salinity, x.up.tempC);
  const cDown = constantsAt(sB, tB);
  if (!solveTaDic(cUp, x.up.taUmolKg, x.up.dicUmolKg, baro, state)) {
    return {
      ok: false,
      code: 'REEFD_METABOLISM_CARBONATE_FAILED',
      reason: 'upstream TA and DIC have no solution',
    };
  }
  const upPco2 = state[STATE.pco2] as number;
  const n = (v: number, s: number) => (v * s0) / s;
  const p = x.previous;
  const march = (cA: number, cAprev: number | undefined, cBprev: number | undefined, q: number) =>
    p && cAprev !== undefined && cBprev !== undefined
      ? forwardWithStorage(cA, cAprev, cBprev, q, x.uMS, x.lengthM, p.dtS)
      : forwardSteady(cA, q, x.uMS, x.lengthM);

  let fasO2 = x.airSea?.kind === 'fixed' ? x.airSea.fasO2MmolM2H / UMOL_M2_S_TO_MMOL_M2_H : 0;
  let fasCo2 = x.airSea?.kind === 'fixed' ? x.airSea.fasCo2MmolM2H / UMOL_M2_S_TO_MMOL_M2_H : 0;
  const wind = x.airSea?.kind === 'wind' ? x.airSea : undefined;
  const airSeaAt = (o2Down: number, pco2Down: number) =>
    airSeaFluxes({
      tempC: 0.5 * (x.up.tempC + tB),
      salinity: s0,
      rhoKgM3: rho,
      o2UmolKg: x.up.o2UmolKg,
      o2DownUmolKg: o2Down,
      o2Mean: wind?.o2Mean ?? 'exponential',
      residenceS: x.lengthM / x.uMS,
      depthM: x.depthM,
      pco2Uatm: 0.5 * (upPco2 + pco2Down),
      ...(wind ? { windMS: wind.windMS } : {}),
      windHeightM: wind?.windHeightM ?? 10,
      baroHpa: baro,
      xco2AirPpm: wind?.xco2AirPpm ?? 0,
    });

  // O2 is not salinity-normalised (docs/methods/metabolism.md 6.1). Its exchange term is linear in O2_B, so the budget is solved
  // for O2_B exactly: o2B = m0 + m1 q with q = (NCP - F_as(o2B))/(rho h). (A fixed point would diverge once
  // w k tau/h > 1, i.e. for strong wind over a shallow, slow flat.)
  const o2March = (q: number) => march(x.up.o2UmolKg, p?.up.o2UmolKg, p?.down.o2UmolKg, q);
  let o2B: number;
  if (wind) {
    const as0 = airSeaAt(x.up.o2UmolKg, upPco2);
    const w =
      wind.o2Mean === 'trapezoid' ? 0.5 : pathMeanWeight((as0.kO2MS * (x.lengthM / x.uMS)) / x.depthM);
    const kr = as0.kO2MS * rho;
    const m0 = o2March(0);
    const m1 = o2March(1) - m0;
    const base = ncp - kr * ((1 - w) * x.up.o2UmolKg - as0.o2SatUmolKg);
    o2B = (m0 + (m1 * base) / rh) / (1 + (m1 * kr * w) / rh);
    fasO2 = kr * ((1 - w) * x.up.o2UmolKg + w * o2B - as0.o2SatUmolKg);
  } else {
    o2B = o2March((ncp - fasO2) / rh);
  }

  // TA and DIC; the CO2 exchange depends on pCO2_B weakly (a k0 dfCO2/dDIC ~ 0.06 a): a fixed point converges.
  let taB = Number.NaN;
  let dicB = Number.NaN;
  let pco2B = Number.NaN;
  let phB = Number.NaN;
  for (let it = 0; it < 50; it++) {
    const nTaB = march(
      n(x.up.taUmolKg, x.up.salinity),
      p ? n(p.up.taUmolKg, p.up.salinity) : undefined,
      p ? n(p.down.taUmolKg, p.down.salinity) : undefined,
      (-2 * nec) / rh,
    );
    const nDicB = march(
      n(x.up.dicUmolKg, x.up.salinity),
      p ? n(p.up.dicUmolKg, p.up.salinity) : undefined,
      p ? n(p.down.dicUmolKg, p.down.salinity) : undefined,
      -(ncp / x.pq + nec + fasCo2) / rh,
    );
    taB = (nTaB * sB) / s0;
    dicB = (nDicB * sB) / s0;
    if (!(taB > 0 && dicB > 0 && solveTaDic(cDown, taB, dicB, baro, state, Number.isNaN(phB) ? 8 : phB))) {
      return {
        ok: false,
        code: 'REEFD_METABOLISM_CARBONATE_FAILED',
        reason: `downstream TA ${taB} and DIC ${dicB} umol/kg have no solution; the fluxes are too large for the residence time`,
      };
    }
    pco2B = state[STATE.pco2] as number;
    phB = state[STATE.ph] as number;
    if (!wind) break;
    const newCo2 = airSeaAt(o2B, pco2B).fasCo2UmolM2S ?? 0;
    const done = Math.abs(newCo2 - fasCo2) < 1e-13;
    fasCo2 = newCo2;
    if (done) break;
  }
  return {
    ok: true,
    o2UmolKg: o2B,
    taUmolKg: taB,
    dicUmolKg: dicB,
    pco2Uatm: pco2B,
    phTotal: phB,
    upPco2Uatm: upPco2,
    fasO2MmolM2H: fasO2 * UMOL_M2_S_TO_MMOL_M2_H,
    fasCo2MmolM2H: fasCo2 * UMOL_M2_S_TO_MMOL_M2_H,
    rhoKgM3: rho,
    residenceMin: x.lengthM / x.uMS / 60,
  };
}
