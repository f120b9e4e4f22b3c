// Air-sea terms of a transect window (docs/methods/metabolism.md 6.2): Wanninkhof (2014) transfer velocities from the 10 m wind,
// O2 from the saturation anomaly (Garcia & Gordon 1992 solubility at the barometric pressure, libs/seawater) and
// CO2 from K0 (fCO2_w - fCO2_a) (Weiss 1974, libs/carbonate), all from transect means.
//
// The transect mean O2 for the exchange term: docs/methods/metabolism.md 6.2 takes the mean of the two stations (trapezoid).
// Gas exchange makes the steady O2 profile exponential, C - C_eq ~ exp(-x k/(h U)), and the trapezoid then
// misestimates the path-mean anomaly by about a^2/12 of the distance to equilibrium, a = k tau/h (tau = L/U).
// With the light-driven NCP of a reef flat that distance is hundreds of umol/kg, so at a = 0.3 (6 m/s wind,
// 4 cm/s, 350 m, 1 m) NCP is off by ~0.5 % and the inverse NEC, which inherits the NCP error amplified about
// 1.4-fold, by > 3 % at night. Our default therefore weights the stations by the exact steady path mean,
// mean = C_A + w(a) (C_B - C_A), w(a) = 1/(1 - e^-a) - 1/a (-> 1/2 as a -> 0, so it reduces to the trapezoid).
// The same weighting for CO2 would use a_CO2 = a k0 dfCO2/dDIC ~ 0.06 a: negligible, so CO2 keeps the trapezoid.

import { airSeaCo2FluxUmolM2S, airSeaO2FluxUmolM2S, gasTransferVelocity, windAt10m } from './gas-exchange.js';
import { constantsAt, fco2FromPco2Uatm, o2SatUmolKg, pco2AirUatm } from './chem.js';

export interface AirSeaInput {
  tempC: number;
  salinity: number;
  rhoKgM3: number;
  /** O2 [umol/kg]: the local (or mean) value, or the upstream value when o2DownUmolKg is given. */
  o2UmolKg: number;
  /** Downstream O2 [umol/kg]: the transect mean is then formed by o2Mean over the path. */
  o2DownUmolKg?: number;
  /** 'exponential' (default): exact steady path mean; 'trapezoid': the mean of the two stations. */
  o2Mean?: 'exponential' | 'trapezoid';
  /** Residence time L/U [s] and mean depth [m], needed for the exponential path mean. */
  residenceS?: number;
  depthM?: number;
  /** Mean water pCO2 of the transect [uatm], if measured. */
  pco2Uatm?: number;
  windMS?: number;
  windHeightM: number;
  /** Barometric pressure [hPa]; 1013.25 when absent. */
  baroHpa?: number;
  xco2AirPpm: number;
}

export interface AirSeaFluxes {
  u10MS: number;
  kO2MS: number;
  kCo2MS: number;
  o2SatUmolKg: number;
  /** The transect-mean O2 used for the exchange term [umol/kg]. */
  o2MeanUmolKg: number;
  pressureAtm: number;
  /** Water-to-air fluxes [umol m-2 s-1]. */
  fasO2UmolM2S: number;
  fasCo2UmolM2S: number | null;
  fco2WaterUatm: number | null;
  fco2AirUatm: number;
  k0MolKgAtm: number;
}

/** Standard atmosphere [hPa]. */
export const STANDARD_ATMOSPHERE_HPA = 1013.25;

/**
 * Weight of the downstream station in the exact steady path mean under linear relaxation at rate a = k tau/h:
 * w(a) = 1/(1 - e^-a) - 1/a, with w(0) = 1/2, w(+inf) = 1 and w(-a) = 1 - w(a). Check: w(0.28) = 0.523303 (algebra).
 */
export function pathMeanWeight(a: number): number {
  if (!Number.isFinite(a)) return a > 0 ? 1 : 0;
  if (Math.abs(a) < 1e-2) {
    const a2 = a * a; // series 1/2 + a/12 - a^3/720 + a^5/30240 (the direct form cancels badly near 0)
    return 0.5 + a * (1 / 12 - a2 * (1 / 720 - a2 / 30240));
  }
  return -1 / Math.expm1(-a) - 1 / a;
}

/** Air-sea fluxes from transect means; no wind means no exchange (k = 0; the caller notes it). */
export function airSeaFluxes(x: AirSeaInput): AirSeaFluxes {
  const baro = x.baroHpa ?? STANDARD_ATMOSPHERE_HPA;
  const pAtm = baro / STANDARD_ATMOSPHERE_HPA;
  const u10 = x.windMS === undefined ? 0 : windAt10m(Math.max(0, x.windMS), x.windHeightM);
  const kO2 = gasTransferVelocity('O2', x.tempC, u10);
  const kCo2 = gasTransferVelocity('CO2', x.tempC, u10);
  const o2Sat = o2SatUmolKg(x.salinity, x.tempC, pAtm);
  let o2Mean = x.o2UmolKg;
  if (x.o2DownUmolKg !== undefined) {
    const a =
      x.o2Mean === 'trapezoid' || x.residenceS === undefined || x.depthM === undefined
        ? 0
        : (kO2 * x.residenceS) / x.depthM;
    o2Mean = x.o2UmolKg + pathMeanWeight(a) * (x.o2DownUmolKg - x.o2UmolKg);
  }
  const c = constantsAt(x.salinity, x.tempC);
  const k0 = c.k0;
  const fco2Air = fco2FromPco2Uatm(c, pco2AirUatm(x.xco2AirPpm, baro, x.salinity, x.tempC), baro);
  const fco2W = x.pco2Uatm === undefined ? null : fco2FromPco2Uatm(c, x.pco2Uatm, baro);
  return {
    u10MS: u10,
    kO2MS: kO2,
    kCo2MS: kCo2,
    o2SatUmolKg: o2Sat,
    o2MeanUmolKg: o2Mean,
    pressureAtm: pAtm,
    fasO2UmolM2S: airSeaO2FluxUmolM2S(kO2, x.rhoKgM3, o2Mean, o2Sat),
    fasCo2UmolM2S: fco2W === null ? null : airSeaCo2FluxUmolM2S(kCo2, x.rhoKgM3, k0, fco2W, fco2Air),
    fco2WaterUatm: fco2W,
    fco2AirUatm: fco2Air,
    k0MolKgAtm: k0,
  };
}
