// 4-beam Janus ADCP coordinate transforms: beam <-> instrument (reefd docs/methods/currents.md 5.1) and
// instrument <-> earth by heading, pitch and roll (docs/methods/currents.md 5.2). The conventions are this
// project's own; each instrument's beam numbering, signs and tilt axes are mapped onto them in the
// sensor configuration and proved by a known-flow or rotation test.
//
// Beam geometry: beam velocities b_i are positive away from the transducer; z points out of the
// face. On a convex head beams 1 and 2 lie in the x-z plane towards +x and -x, beams 3 and 4 in the
// y-z plane towards -y and +y. A concave head crosses the beams, which flips x and y (c = -1).
//   x = c a (b1 - b2), y = c a (b4 - b3), z = b (b1 + b2 + b3 + b4), e = d (b1 + b2 - b3 - b4)
//   a = 1/(2 sin theta), b = 1/(4 cos theta), d = a/sqrt 2
// e (error velocity) is zero in horizontally homogeneous flow; d gives it the noise variance of a
// horizontal component.
//
// Attitude: [E, N, U]^T = H P R [x, y, z]^T (roll first, then pitch, then heading), with
//   H = [[ch, sh, 0], [-sh, ch, 0], [0, 0, 1]]     heading = bearing of +y, clockwise from north
//   P = [[1, 0, 0], [0, cp, -sp], [0, sp, cp]]     positive pitch raises +y (right-hand about +x)
//   R = [[cr, 0, sr], [0, 1, 0], [-sr, 0, cr]]     positive roll lowers +x (right-hand about +y)
// Check (worked by hand): heading 90, pitch = roll = 0 maps instrument +y to east and +x to south.
import { CURRENT_ERRORS } from './errors.js';

/** Precomputed factors of a 4-beam Janus head (docs/methods/currents.md 5.1). */
export interface JanusHead {
  readonly beamAngleDeg: number;
  readonly convex: boolean;
  /** 1/(2 sin theta) */
  readonly a: number;
  /** 1/(4 cos theta) */
  readonly b: number;
  /** a/sqrt 2 */
  readonly d: number;
  /** +1 convex, -1 concave */
  readonly c: number;
  readonly sinTheta: number;
  readonly cosTheta: number;
}

const DEG = Math.PI / 180;

/**
 * Factors of a Janus head. beamAngleDeg: angle of each beam from the head's axis, (0, 60) deg
 * (instruments use 20-30 deg). Check (worked by hand): theta = 30 deg gives a = 1, b = 1/(2 sqrt 3).
 */
export function janusHead(beamAngleDeg = 20, convex = true): JanusHead {
  if (!(beamAngleDeg > 0 && beamAngleDeg < 60)) {
    throw CURRENT_ERRORS.error('REEFD_CURRENTS_BEAM_ANGLE', `beam angle ${beamAngleDeg} deg`);
  }
  const s = Math.sin(beamAngleDeg * DEG);
  const co = Math.cos(beamAngleDeg * DEG);
  const a = 1 / (2 * s);
  return Object.freeze({
    beamAngleDeg,
    convex,
    a,
    b: 1 / (4 * co),
    d: a / Math.SQRT2,
    c: convex ? 1 : -1,
    sinTheta: s,
    cosTheta: co,
  });
}

/**
 * Beam velocities (b1..b4, m/s, positive away from the head) to instrument (x, y, z, e) in m/s.
 * Check (worked by hand): theta = 20 deg, convex, b = [sin 20, -sin 20, 0, 0] gives x = 1, y = z = e = 0.
 */
export function beamToInstrument(
  beam: ArrayLike<number>,
  head: JanusHead,
  out: Float64Array = new Float64Array(4),
): Float64Array {
  const b1 = beam[0] as number;
  const b2 = beam[1] as number;
  const b3 = beam[2] as number;
  const b4 = beam[3] as number;
  out[0] = head.c * head.a * (b1 - b2);
  out[1] = head.c * head.a * (b4 - b3);
  out[2] = head.b * (b1 + b2 + b3 + b4);
  out[3] = head.d * (b1 + b2 - b3 - b4);
  return out;
}

/**
 * Three-beam solution (docs/methods/currents.md 5.1): beam `bad` (0-3) is rebuilt from the other three by setting
 * e = 0 (b1 + b2 = b3 + b4), then transformed. out[3] (error velocity) is NaN: it is not measured.
 * In flow with e = 0 it equals the four-beam solution exactly.
 */
export function beamToInstrument3(
  beam: ArrayLike<number>,
  bad: number,
  head: JanusHead,
  out: Float64Array = new Float64Array(4),
): Float64Array {
  let b1 = beam[0] as number;
  let b2 = beam[1] as number;
  let b3 = beam[2] as number;
  let b4 = beam[3] as number;
  if (bad === 0) b1 = b3 + b4 - b2;
  else if (bad === 1) b2 = b3 + b4 - b1;
  else if (bad === 2) b3 = b1 + b2 - b4;
  else b4 = b1 + b2 - b3;
  out[0] = head.c * head.a * (b1 - b2);
  out[1] = head.c * head.a * (b4 - b3);
  out[2] = head.b * (b1 + b2 + b3 + b4);
  out[3] = Number.NaN;
  return out;
}

/**
 * Inverse of beamToInstrument: instrument (x, y, z, e) in m/s to beam velocities b1..b4.
 * With e = 0 the beams are those of horizontally homogeneous flow. Used to synthesize beam data.
 */
export function instrumentToBeam(
  inst: ArrayLike<number>,
  head: JanusHead,
  out: Float64Array = new Float64Array(4),
): Float64Array {
  const x = inst[0] as number;
  const y = inst[1] as number;
  const z = inst[2] as number;
  const e = (inst[3] as number | undefined) ?? 0;
  const sum = z / head.b; // b1 + b2 + b3 + b4
  const diff = e / head.d; // (b1 + b2) - (b3 + b4)
  const s12 = 0.5 * (sum + diff);
  const s34 = 0.5 * (sum - diff);
  const d12 = (head.c * x) / head.a; // b1 - b2 (c = +-1 is its own inverse)
  const d43 = (head.c * y) / head.a; // b4 - b3
  out[0] = 0.5 * (s12 + d12);
  out[1] = 0.5 * (s12 - d12);
  out[2] = 0.5 * (s34 - d43);
  out[3] = 0.5 * (s34 + d43);
  return out;
}

/** Heading, pitch and roll in degrees (conventions in the file header). */
export interface AttitudeDeg {
  readonly headingDeg: number;
  readonly pitchDeg: number;
  readonly rollDeg: number;
}

/**
 * Rotation matrix M = H P R, row-major 3 x 3, instrument -> earth (docs/methods/currents.md 5.2). Angles in deg,
 * heading already corrected for declination and alignment. Orthonormal: earth -> instrument is M^T.
 */
export function rotationMatrix(
  headingDeg: number,
  pitchDeg: number,
  rollDeg: number,
  out: Float64Array = new Float64Array(9),
): Float64Array {
  const ch = Math.cos(headingDeg * DEG);
  const sh = Math.sin(headingDeg * DEG);
  const cp = Math.cos(pitchDeg * DEG);
  const sp = Math.sin(pitchDeg * DEG);
  const cr = Math.cos(rollDeg * DEG);
  const sr = Math.sin(rollDeg * DEG);
  // P R = [[cr, 0, sr], [sp sr, cp, -sp cr], [-cp sr, sp, cp cr]]; then H (P R).
  const r10 = sp * sr;
  const r12 = -sp * cr;
  out[0] = ch * cr + sh * r10;
  out[1] = sh * cp;
  out[2] = ch * sr + sh * r12;
  out[3] = -sh * cr + ch * r10;
  out[4] = ch * cp;
  out[5] = -sh * sr + ch * r12;
  out[6] = -cp * sr;
  out[7] = sp;
  out[8] = cp * cr;
  return out;
}

function matrixOf(att: ArrayLike<number> | AttitudeDeg): ArrayLike<number> {
  return 'headingDeg' in att ? rotationMatrix(att.headingDeg, att.pitchDeg, att.rollDeg) : att;
}

/**
 * Instrument (x, y, z[, e]) to earth (east, north, up, e) in m/s. `att` is a rotationMatrix()
 * result (fast path) or the angles. The error velocity is a scalar and passes through.
 * Check (worked by hand): heading 90, level, inst = [0, 1, 0, 0] gives [1, 0, 0, 0].
 */
export function instrumentToEarth(
  inst: ArrayLike<number>,
  att: ArrayLike<number> | AttitudeDeg,
  out: Float64Array = new Float64Array(4),
): Float64Array {
  const m = matrixOf(att);
  const x = inst[0] as number;
  const y = inst[1] as number;
  const z = inst[2] as number;
  out[0] = (m[0] as number) * x + (m[1] as number) * y + (m[2] as number) * z;
  out[1] = (m[3] as number) * x + (m[4] as number) * y + (m[5] as number) * z;
  out[2] = (m[6] as number) * x + (m[7] as number) * y + (m[8] as number) * z;
  out[3] = (inst[3] as number | undefined) ?? 0;
  return out;
}

/** Inverse of instrumentToEarth (multiplies by M^T); the error velocity passes through. */
export function earthToInstrument(
  earth: ArrayLike<number>,
  att: ArrayLike<number> | AttitudeDeg,
  out: Float64Array = new Float64Array(4),
): Float64Array {
  const m = matrixOf(att);
  const e = earth[0] as number;
  const n = earth[1] as number;
  const u = earth[2] as number;
  out[0] = (m[0] as number) * e + (m[3] as number) * n + (m[6] as number) * u;
  out[1] = (m[1] as number) * e + (m[4] as number) * n + (m[7] as number) * u;
  out[2] = (m[2] as number) * e + (m[5] as number) * n + (m[8] as number) * u;
  out[3] = (earth[3] as number | undefined) ?? 0;
  return out;
}

/**
 * Gimbal pitch from independent axis tilts (docs/methods/currents.md 5.2): p = atan(tan p_meas cos r_meas), deg.
 * Only for tilt sensors that report independent axis tilts (instrument-dependent).
 */
export function gimbalPitchDeg(pitchMeasDeg: number, rollMeasDeg: number): number {
  return Math.atan(Math.tan(pitchMeasDeg * DEG) * Math.cos(rollMeasDeg * DEG)) / DEG;
}

/** Total tilt acos(cos p cos r) in deg, for pitch and roll in deg (docs/methods/currents.md 5.4). */
export function totalTiltDeg(pitchDeg: number, rollDeg: number): number {
  const c = Math.cos(pitchDeg * DEG) * Math.cos(rollDeg * DEG);
  return Math.acos(Math.min(1, Math.max(-1, c))) / DEG;
}
