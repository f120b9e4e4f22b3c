// ADCP bin geometry and the side-lobe limit (reefd docs/methods/currents.md 5.3), and water depth from the
// head's pressure (hydrostatic, docs/methods/seawater.md 2.2; docs/methods/waves.md 4.1). Ranges are along
// the head's axis ("vertical range" for a level head); heights z are above the bed, m, positive up.

const DEG = Math.PI / 180;
/** 1 dbar = 1e4 Pa */
const PA_PER_DBAR = 1e4;

/**
 * Range of the centre of bin n (0-based), m: r_n = r_1 + n dz, with r_1 = blank + dz/2 unless the
 * instrument defines cell 1 otherwise (firstBinRangeM). Check (worked by hand): blank 0.1, dz 0.2,
 * n = 2 gives 0.1 + 0.1 + 0.4 = 0.6 m.
 */
export function binRangeM(n: number, blankM: number, binM: number, firstBinRangeM?: number): number {
  return (firstBinRangeM ?? blankM + 0.5 * binM) + n * binM;
}

/**
 * Height above the bed of a bin centre, m: z = z_head +- r cos p cos r (+ up-looking, - down-looking).
 * The cos p cos r projection errs < 0.4 % below 5 deg tilt (docs/methods/currents.md 5.3).
 */
export function binHeightM(
  rangeM: number,
  headHeightM: number,
  orientation: 'up' | 'down',
  pitchDeg = 0,
  rollDeg = 0,
): number {
  const k = Math.cos(pitchDeg * DEG) * Math.cos(rollDeg * DEG);
  return orientation === 'up' ? headHeightM + rangeM * k : headHeightM - rangeM * k;
}

/**
 * Distance D from the head to the boundary it looks at, m: the surface (h - z_head) for an
 * up-looking head, with the wave troughs (D - Hm0_ss/2) when the sea state is known, or the bed
 * (z_head) for a down-looking one.
 */
export function boundaryDistanceM(
  orientation: 'up' | 'down',
  headHeightM: number,
  depthM: number,
  hm0SsM?: number,
): number {
  if (orientation === 'down') return headHeightM;
  const d = depthM - headHeightM;
  return hm0SsM !== undefined && hm0SsM > 0 ? d - 0.5 * hm0SsM : d;
}

/**
 * Largest clean range along the head's axis, m: D cos theta (docs/methods/currents.md 5.3). A bin is kept only if
 * its far edge r_n + dz/2 is within it. The side lobe's first boundary echo comes from the
 * perpendicular distance D whatever the tilt, and a bin at axial range r lies at slant range
 * r/cos theta on every beam, so the limit in axial range does not depend on tilt.
 * Check: theta = 25 deg loses the top 1 - cos 25 = 9.37 % of D (docs/methods/currents.md 5.3).
 */
export function sideLobeMaxRangeM(boundaryDistM: number, beamAngleDeg: number): number {
  return boundaryDistM * Math.cos(beamAngleDeg * DEG);
}

/**
 * Water depth h, m, from the absolute pressure at the head: h = z_head + 1e4 (p - p_atm)/(rho g).
 * p, p_atm in dbar; rho in kg m-3; g in m s-2. Check (worked by hand): p - p_atm = 1.0250 dbar,
 * rho 1025, g 10 gives 1.0 m of water above the head.
 */
export function depthFromPressureM(
  presDbar: number,
  patmDbar: number,
  rhoKgM3: number,
  gMS2: number,
  headHeightM: number,
): number {
  return headHeightM + (PA_PER_DBAR * (presDbar - patmDbar)) / (rhoKgM3 * gMS2);
}
