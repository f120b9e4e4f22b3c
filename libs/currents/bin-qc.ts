// Per-bin QC and transformation of one ADCP ensemble (reefd docs/methods/currents.md 5.1, 5.3, 5.4), with QARTOD
// flags (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing; docs/methods/qc.md 7.1, 7.4: a bin takes the
// worst evaluated test). Engineering defaults in the style of the QARTOD currents manual:
//   side lobe    far edge r_n + dz/2 beyond D_eff cos theta            -> 4
//   boundary     at or beyond the surface (bed) peak of the four-beam median echo   -> 4
//   beam tests   null, correlation < 50 %, percent good < 25 %
//                beam coordinates: one bad beam -> three-beam solution, 3; two or more -> 4
//                inst/earth coordinates: any bad beam -> 4 (a solution cannot be rebuilt)
//   echo         one beam > four-beam median + 30 counts               -> 3
//   error vel.   |e| > 0.05 m/s -> 3, > 0.15 m/s -> 4 (not evaluated for three-beam solutions)
//   vertical     |w| > 0.10 m/s -> 3
//   speed        sqrt(E^2 + N^2) > 1.5 m/s -> 3, > 3 m/s -> 4
//   tilt         > 10 deg -> 3 (the bins are not remapped to equal depths); > 20 deg fails upstream
import { beamToInstrument, beamToInstrument3, instrumentToEarth, type JanusHead } from './transforms.js';
import type { AdcpEnsemble, AdcpQcThresholds } from './types.js';

/** Everything the bin loop needs, resolved once per ensemble. */
export interface BinPlan {
  readonly ens: AdcpEnsemble;
  readonly head: JanusHead;
  /** instrument -> earth rotation (row-major 3 x 3); unused for earth coordinates */
  readonly rot: Float64Array;
  readonly qc: Readonly<AdcpQcThresholds>;
  /** range of bin 1's centre and the bin size along the head's axis, m */
  readonly r1M: number;
  readonly binM: number;
  /** largest clean axial range (side lobes), m */
  readonly rMaxM: number;
  /** head height above the bed, m, and dz/dr (+cos p cos r up-looking, -cos p cos r down-looking) */
  readonly zHeadM: number;
  readonly dzdr: number;
  readonly depthM: number;
  /** flag of the tilt test: 1, 3, or 2 when no tilt was reported */
  readonly tiltFlag: number;
  /** beam coordinates: message index of each beam, and the sign making beams positive away from the head */
  readonly beamMap: readonly [number, number, number, number];
  readonly beamSign: number;
}

/** Tally of the bin loop. */
export interface BinTally {
  /** valid bins (flag 1 or 3) written to the output arrays */
  readonly valid: number;
  readonly threeBeam: number;
  /** worst flag among the valid bins (1 or 3) */
  readonly worst: number;
  /** mean square error velocity over valid bins that have one, (m/s)^2; NaN if none */
  readonly errMeanSq: number;
}

const NO_PEAK = 0x7fffffff;
const IDENTITY = [0, 1, 2, 3] as const;

function median4(a: number, b: number, c: number, d: number): number {
  // mean of the middle two of four values
  const lo = Math.min(a, b, c, d);
  const hi = Math.max(a, b, c, d);
  return 0.5 * (a + b + c + d - lo - hi);
}

/**
 * Index of the boundary (surface or bed) echo peak, or NO_PEAK. It works on the four-beam median
 * echo, so that a target in one beam (a fish) is not taken for the boundary. The peak is the largest
 * rise of the echo above its running minimum nearer the head, and it counts only if the rise reaches
 * `riseCounts`: echo falls with range in open water, so a boundary stands out as a rise.
 */
function echoPeakIndex(echo: readonly (readonly number[])[], riseCounts: number): number {
  let runMin = Number.POSITIVE_INFINITY;
  let best = 0;
  let bestIdx = NO_PEAK;
  for (let n = 0; n < echo.length; n++) {
    const row = echo[n] as readonly number[];
    const v = median4(row[0] as number, row[1] as number, row[2] as number, row[3] as number);
    if (n > 0 && v - runMin > best) {
      best = v - runMin;
      bestIdx = n;
    }
    if (v < runMin) runMin = v;
  }
  return best >= riseCounts ? bestIdx : NO_PEAK;
}

/** The beam tests of one bin; one instance per ensemble, overwritten for each bin (no allocation per bin). */
interface BeamCheck {
  nullCount: number;
  badCount: number;
  badBeam: number;
}

/** Per-ensemble constants of the bin loop. */
interface BinLoop {
  readonly plan: BinPlan;
  readonly isBeam: boolean;
  readonly isEarth: boolean;
  readonly map: readonly [number, number, number, number];
  readonly sign: number;
  /** One work vector: the transforms read all inputs before writing, so they run in place. */
  readonly w4: Float64Array;
  readonly check: BeamCheck;
}

/** Reads bin n's four values into w4 (NaN for null) and runs the null, correlation and percent-good tests. */
function readBeams(loop: BinLoop, n: number): BeamCheck {
  const { plan, isBeam, map, sign, w4, check } = loop;
  const { ens, qc } = plan;
  const row = ens.velMS[n] as readonly (number | null)[];
  const cRow = ens.corrPct?.[n];
  const pRow = ens.pgPct?.[n];
  check.nullCount = 0;
  check.badCount = 0;
  check.badBeam = -1;
  for (let i = 0; i < 4; i++) {
    const src = map[i as 0 | 1 | 2 | 3];
    const v = row[src];
    // In inst/earth coordinates the 4th value is the error velocity: a null there is "not measured".
    const isNull = v === null || v === undefined || !Number.isFinite(v);
    w4[i] = isNull ? Number.NaN : sign * v;
    const beamBad =
      (cRow !== undefined && (cRow[src] as number) < qc.corrMinPct) ||
      (pRow !== undefined && (pRow[src] as number) < qc.pgMinPct);
    if (isNull && (isBeam || i < 3)) check.nullCount++;
    if ((isNull && (isBeam || i < 3)) || beamBad) {
      check.badCount++;
      check.badBeam = i;
    }
  }
  return check;
}

/**
 * Turns w4 into earth velocities (E, N, w, error) after the beam tests: the bin's flag so far, 4 when no
 * solution can be built.
 */
function toEarthVelocity(loop: BinLoop, check: BeamCheck): number {
  const { plan, isBeam, isEarth, w4 } = loop;
  const { head, rot } = plan;
  let flag = plan.tiltFlag === 3 ? 3 : 1;
  if (isBeam) {
    if (check.badCount >= 2) return 4;
    if (check.badCount === 1) {
      beamToInstrument3(w4, check.badBeam, head, w4);
      flag = 3;
    } else {
      beamToInstrument(w4, head, w4);
    }
    instrumentToEarth(w4, rot, w4);
  } else {
    if (check.badCount >= 1) return 4;
    if (!isEarth) instrumentToEarth(w4, rot, w4);
  }
  return flag;
}

/** The error velocity, vertical velocity, speed and echo tests of bin n on the earth velocities in w4. */
function velocityTests(loop: BinLoop, n: number, flagIn: number): number {
  const { qc, ens } = loop.plan;
  const w4 = loop.w4;
  let flag = flagIn;
  const e = w4[0] as number;
  const nn = w4[1] as number;
  const w = w4[2] as number;
  const err = w4[3] as number;
  if (Number.isFinite(err)) {
    const ae = Math.abs(err);
    if (ae > qc.errFailMS) flag = 4;
    else if (ae > qc.errSuspectMS && flag < 3) flag = 3;
  }
  if (Math.abs(w) > qc.wSuspectMS && flag < 3) flag = 3;
  const speed = Math.sqrt(e * e + nn * nn);
  if (speed > qc.speedFailMS) flag = 4;
  else if (speed > qc.speedSuspectMS && flag < 3) flag = 3;
  const eRow = ens.echo?.[n];
  if (eRow !== undefined && flag < 3) {
    const a = eRow[0] as number;
    const b = eRow[1] as number;
    const c = eRow[2] as number;
    const d = eRow[3] as number;
    const lim = median4(a, b, c, d) + qc.echoOutlierCounts;
    if (a > lim || b > lim || c > lim || d > lim) flag = 3;
  }
  return flag;
}

/**
 * QC, transform and place every bin. Writes binFlags (one per bin, range order) and, for the valid
 * bins in range order, heights zOut (m), velocities eastOut/northOut (m/s).
 */
export function qcBins(
  plan: BinPlan,
  binFlags: number[],
  zOut: Float64Array,
  eastOut: Float64Array,
  northOut: Float64Array,
): BinTally {
  const { ens, qc } = plan;
  const isBeam = ens.coord === 'beam';
  const loop: BinLoop = {
    plan,
    isBeam,
    isEarth: ens.coord === 'earth',
    map: isBeam ? plan.beamMap : IDENTITY,
    sign: isBeam ? plan.beamSign : 1,
    w4: new Float64Array(4),
    check: { nullCount: 0, badCount: 0, badBeam: -1 },
  };
  const w4 = loop.w4;
  const peak = ens.echo === undefined ? NO_PEAK : echoPeakIndex(ens.echo, qc.echoPeakRiseCounts);
  let valid = 0;
  let threeBeam = 0;
  let worst = 1;
  let errSq = 0;
  let errN = 0;
  const halfBin = 0.5 * plan.binM;

  for (let n = 0; n < ens.velMS.length; n++) {
    const rM = plan.r1M + n * plan.binM;
    const zM = plan.zHeadM + plan.dzdr * rM;
    if (rM + halfBin > plan.rMaxM || zM <= 0 || zM >= plan.depthM || n >= peak) {
      binFlags[n] = 4; // side lobes, outside the water column, or at or beyond the boundary echo
      continue;
    }
    const check = readBeams(loop, n);
    if (check.nullCount === (isBeam ? 4 : 3)) {
      binFlags[n] = 9;
      continue;
    }
    const flag0 = toEarthVelocity(loop, check);
    const flag = flag0 === 4 ? 4 : velocityTests(loop, n, flag0);
    binFlags[n] = flag;
    if (flag === 4) continue;
    if (flag > worst) worst = flag;
    if (isBeam && check.badCount === 1) threeBeam++;
    const err = w4[3] as number;
    if (Number.isFinite(err)) {
      errSq += err * err;
      errN++;
    }
    zOut[valid] = zM;
    eastOut[valid] = w4[0] as number;
    northOut[valid] = w4[1] as number;
    valid++;
  }
  return { valid, threeBeam, worst, errMeanSq: errN > 0 ? errSq / errN : Number.NaN };
}
