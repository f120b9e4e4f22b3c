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

type ForwardFail = Extract<ForwardResult, { ok: false }>;

/** The transect means and the upstream carbonate state shared by the O2 and the carbon budgets. */
interface ForwardContext {
  readonly x: ForwardInput;
  readonly tB: number;
  readonly sB: number;
  readonly s0: number;
  readonly rho: number;
  /** rho h */
  readonly rh: number;
  /** NCP and NEC [umol m-2 s-1] */
  readonly ncp: number;
  readonly nec: number;
  readonly baro: number;
  readonly state: Float64Array;
  readonly cDown: ReturnType<typeof constantsAt>;
  readonly upPco2: number;
  readonly wind: Extract<ForwardAirSea, { kind: 'wind' }> | undefined;
}

/** Transect means and the upstream carbonate state; a ForwardFail when upstream TA and DIC have no solution. */
function forwardContext(x: ForwardInput): ForwardContext | ForwardFail {
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
  const wind = x.airSea?.kind === 'wind' ? x.airSea : undefined;
  return { x, tB, sB, s0, rho, rh, ncp, nec, baro, state, cDown, upPco2, wind };
}

/** One concentration marched down the transect: with storage when a previous window has both stations. */
function march(
  c: ForwardContext,
  cA: number,
  cAprev: number | undefined,
  cBprev: number | undefined,
  q: number,
) {
  const { x } = c;
  const p = x.previous;
  return p && cAprev !== undefined && cBprev !== undefined
    ? forwardWithStorage(cA, cAprev, cBprev, q, x.uMS, x.lengthM, p.dtS)
    : forwardSteady(cA, q, x.uMS, x.lengthM);
}

/** The air-sea terms on the transect means for a downstream O2 and pCO2. */
function airSeaAt(c: ForwardContext, o2Down: number, pco2Down: number) {
  const { x, wind } = c;
  return airSeaFluxes({
    tempC: 0.5 * (x.up.tempC + c.tB),
    salinity: c.s0,
    rhoKgM3: c.rho,
    o2UmolKg: x.up.o2UmolKg,
    o2DownUmolKg: o2Down,
    o2Mean: wind?.o2Mean ?? 'exponential',
    residenceS: x.lengthM / x.uMS,
    depthM: x.depthM,
    pco2Uatm: 0.5 * (c.upPco2 + pco2Down),
    ...(wind ? { windMS: wind.windMS } : {}),
    windHeightM: wind?.windHeightM ?? 10,
    baroHpa: c.baro,
    xco2AirPpm: wind?.xco2AirPpm ?? 0,
  });
}

/**
 * O2 is not salinity-normalised (docs/methods/metabolism.md 6.1). Its exchange term is linear in O2_B, so the budget is solved
 * for O2_B exactly: o2B = m0 + m1 q with q = (NCP - F_as(o2B))/(rho h). (A fixed point would diverge once
 * w k tau/h > 1, i.e. for strong wind over a shallow, slow flat.)
 */
function o2Downstream(c: ForwardContext, fasO2Fixed: number): { o2B: number; fasO2: number } {
  const { x, wind, rho, rh, ncp } = c;
  const p = x.previous;
  const o2March = (q: number) => march(c, x.up.o2UmolKg, p?.up.o2UmolKg, p?.down.o2UmolKg, q);
  if (!wind) return { o2B: o2March((ncp - fasO2Fixed) / rh), fasO2: fasO2Fixed };
  const as0 = airSeaAt(c, x.up.o2UmolKg, c.upPco2);
  const w = wind.o2Mean === 'trapezoid' ? 0.5 : pathMeanWeight((as0.kO2MS * (x.lengthM / x.uMS)) / x.depthM);
  const kr = as0.kO2MS * rho;
  const m0 = o2March(0);
  const m1 = o2March(1) - m0;
  const base = ncp - kr * ((1 - w) * x.up.o2UmolKg - as0.o2SatUmolKg);
  const o2B = (m0 + (m1 * base) / rh) / (1 + (m1 * kr * w) / rh);
  return { o2B, fasO2: kr * ((1 - w) * x.up.o2UmolKg + w * o2B - as0.o2SatUmolKg) };
}

/** TA and DIC; the CO2 exchange depends on pCO2_B weakly (a k0 dfCO2/dDIC ~ 0.06 a): a fixed point converges. */
function carbonDownstream(
  c: ForwardContext,
  o2B: number,
  fasCo2Start: number,
): ForwardFail | { taB: number; dicB: number; pco2B: number; phB: number; fasCo2: number } {
  const { x, s0, sB, rh, ncp, nec, state } = c;
  const p = x.previous;
  const n = (v: number, s: number) => (v * s0) / s;
  let fasCo2 = fasCo2Start;
  let taB = Number.NaN;
  let dicB = Number.NaN;
  let pco2B = Number.NaN;
  let phB = Number.NaN;
  for (let it = 0; it < 50; it++) {
    const nTaB = march(
      c,
      n(x.up.taUmolKg, x.up.salinity),
      p ? n(p.up.taUmolKg, p.up.salinity) : undefined,
      p ? n(p.down.taUmolKg, p.down.salinity) : undefined,
      (-2 * nec) / rh,
    );
    const nDicB = march(
      c,
      n(x.up.dicUmolKg, x.up.salinity),
      p ? n(p.up.dicUmolKg, p.up.salinity) : undefined,
      p ? n(p.down.dicUmolKg, p.down.salinity) : undefined,
      -(ncp / x.pq + nec + fasCo2) / rh,
    );
    taB = (nTaB * sB) / s0;
    dicB = (nDicB * sB) / s0;
    if (!(
      taB > 0 &&
      dicB > 0 &&
      solveTaDic(c.cDown, taB, dicB, c.baro, state, Number.isNaN(phB) ? 8 : phB)
    )) {
      return {
        ok: false,
        code: 'REEFD_METABOLISM_CARBONATE_FAILED',
        reason: `downstream TA ${taB} and DIC ${dicB} umol/kg have no solution; the fluxes are too large for the residence time`,
      };
    }
    pco2B = state[STATE.pco2] as number;
    phB = state[STATE.ph] as number;
    if (!c.wind) break;
    const newCo2 = airSeaAt(c, o2B, pco2B).fasCo2UmolM2S ?? 0;
    const done = Math.abs(newCo2 - fasCo2) < 1e-13;
    fasCo2 = newCo2;
    if (done) break;
  }
  return { taB, dicB, pco2B, phB, fasCo2 };
}

/**
 * Downstream chemistry of a transect. All rates are the contract's: NCP mmol O2 m-2 h-1, NEC mmol CaCO3 m-2 h-1.
 * Check: with no air-sea term, O2_B - O2_A = NCP L/(3.6 rho h U) exactly (docs/methods/metabolism.md 6.4).
 */
export function forwardDownstream(x: ForwardInput): ForwardResult {
  const c = forwardContext(x);
  if ('ok' in c) return c;
  const fasO2Fixed = x.airSea?.kind === 'fixed' ? x.airSea.fasO2MmolM2H / UMOL_M2_S_TO_MMOL_M2_H : 0;
  const fasCo2Fixed = x.airSea?.kind === 'fixed' ? x.airSea.fasCo2MmolM2H / UMOL_M2_S_TO_MMOL_M2_H : 0;
  const { o2B, fasO2 } = o2Downstream(c, fasO2Fixed);
  const carbon = carbonDownstream(c, o2B, fasCo2Fixed);
  if ('ok' in carbon) return carbon;
  return {
    ok: true,
    o2UmolKg: o2B,
    taUmolKg: carbon.taB,
    dicUmolKg: carbon.dicB,
    pco2Uatm: carbon.pco2B,
    phTotal: carbon.phB,
    upPco2Uatm: c.upPco2,
    fasO2MmolM2H: fasO2 * UMOL_M2_S_TO_MMOL_M2_H,
    fasCo2MmolM2H: carbon.fasCo2 * UMOL_M2_S_TO_MMOL_M2_H,
    rhoKgM3: c.rho,
    residenceMin: x.lengthM / x.uMS / 60,
  };
}
