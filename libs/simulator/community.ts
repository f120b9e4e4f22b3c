// Benthic community metabolism of the fictional reef and the air-sea gas exchange it trades against.
// NCP: P-I curve NCP = Pmax tanh(I/Ik) - R (Jassby & Platt 1976, Limnol. Oceanogr. 21, 540; science 6.3).
// NEC: the same light shape between a night and a day rate. Light at the bed: Beer-Lambert, I = I0 exp(-Kd h).
// Gas exchange: k660 = 0.251 U10^2 cm/h (Wanninkhof 2014, Limnol. Oceanogr. Methods 12, 351; science 6.2),
// Schmidt numbers of Wanninkhof (2014) for S 35, U10 from the neutral power law U10 = Uz (10/z)^0.11.

/** Rates in mmol m-2 h-1; reef-typical values (common practice): Pmax 40-60, R 15-20, NEC ~10 day / ~2 night. */
export interface CommunityParams {
  pmaxMmolM2H: number;
  respMmolM2H: number;
  ikUmolM2S: number;
  necDayMmolM2H: number;
  necNightMmolM2H: number;
  /** Diffuse attenuation of PAR, m-1 (clear reef water 0.05-0.2, common practice). */
  kdPerM: number;
}

export const FLAT_COMMUNITY: Readonly<CommunityParams> = Object.freeze({
  pmaxMmolM2H: 58,
  respMmolM2H: 19,
  ikUmolM2S: 380,
  necDayMmolM2H: 11,
  necNightMmolM2H: 2,
  kdPerM: 0.12,
});

/** Lagoon patch reef: sparser cover, more sediment respiration. */
export const LAGOON_COMMUNITY: Readonly<CommunityParams> = Object.freeze({
  pmaxMmolM2H: 24,
  respMmolM2H: 14,
  ikUmolM2S: 300,
  necDayMmolM2H: 4,
  necNightMmolM2H: 0.5,
  kdPerM: 0.18,
});

export interface Metabolism {
  ncpMmolM2H: number;
  necMmolM2H: number;
  /** The two parts of NCP: gross production and community respiration (positive), mmol O2 m-2 h-1. */
  gppMmolM2H: number;
  respMmolM2H: number;
}

/** Community rates at surface PAR parSurface (umol m-2 s-1) over water depth depthM. Check: PAR 0 gives
 * NCP = -R and NEC = the night rate (by construction). */
export function communityRates(
  parSurfaceUmolM2S: number,
  depthM: number,
  p: Readonly<CommunityParams>,
  productivityScale = 1,
): Metabolism {
  const iBed = Math.max(0, parSurfaceUmolM2S) * Math.exp(-p.kdPerM * Math.max(depthM, 0));
  const shape = Math.tanh(iBed / p.ikUmolM2S);
  const gpp = productivityScale * p.pmaxMmolM2H * shape;
  return {
    ncpMmolM2H: gpp - p.respMmolM2H,
    necMmolM2H: p.necNightMmolM2H + (p.necDayMmolM2H - p.necNightMmolM2H) * shape,
    gppMmolM2H: gpp,
    respMmolM2H: p.respMmolM2H,
  };
}

/** mmol m-2 h-1 to umol m-2 s-1. */
export const MMOL_M2_H_TO_UMOL_M2_S = 1000 / 3600;

function schmidt(a: readonly number[], tempC: number): number {
  const [A, B, C, D, E] = a as [number, number, number, number, number];
  return A + B * tempC + C * tempC ** 2 + D * tempC ** 3 + E * tempC ** 4;
}
const SC_CO2 = [2116.8, -136.25, 4.7353, -0.092307, 0.0007555] as const;
const SC_O2 = [1920.4, -135.6, 5.2122, -0.10939, 0.00093777] as const;

/** Gas transfer velocities (m/s) of O2 and CO2 at wind windMS measured heightM above the sea.
 * Check: U10 = 10 m/s gives k660 = 25.1 cm/h (Wanninkhof 2014). */
export function transferVelocities(
  windMS: number,
  heightM: number,
  tempC: number,
): { kO2MS: number; kCo2MS: number } {
  const u10 = windMS * (10 / heightM) ** 0.11;
  const k660 = 0.251 * u10 * u10; // cm/h
  const toMS = 1 / 3.6e5;
  return {
    kO2MS: k660 * (schmidt(SC_O2, tempC) / 660) ** -0.5 * toMS,
    kCo2MS: k660 * (schmidt(SC_CO2, tempC) / 660) ** -0.5 * toMS,
  };
}
