import { describe, expect, it } from 'vitest';
import { processEnsemble } from './process.js';
import { synthesizeBeamEnsemble, type SynthesisSpec } from './synthesize.js';
import type { AdcpEnsemble, AdcpSensorConfig, CurrentContext, CurrentOk, CurrentResult } from './types.js';

const DEG = Math.PI / 180;

function ok(r: CurrentResult): CurrentOk {
  if (!r.ok) throw new Error(`expected ok, got ${r.code}: ${r.message}`);
  return r;
}

const SENSOR: AdcpSensorConfig = { heightM: 0.35, beamAngleDeg: 25, orientation: 'up' };
const CTX: CurrentContext = { depthM: 2.35, reefAxisDeg: 270 };
const spec = (over: Partial<SynthesisSpec> = {}): SynthesisSpec => ({
  sensor: SENSOR,
  nBins: 20,
  blankM: 0.1,
  binM: 0.1,
  headingDeg: 10,
  pitchDeg: 2,
  rollDeg: 1,
  profile: () => [0.15, 0.05, 0],
  ...over,
});
const ENS = synthesizeBeamEnsemble(spec());

/** Replace one field of bin n, beam i with value v. */
function setCell(a: readonly (readonly number[])[], n: number, i: number, v: number): number[][] {
  return a.map((row, k) => row.map((x, j) => (k === n && j === i ? v : x)));
}

describe('side lobes in an ensemble (docs/methods/currents.md 5.3)', () => {
  it('theta 25, D = 10 m: bins whose far edge passes D cos 25 = 9.063 m fail (worked by hand)', () => {
    // r_n = 0.75 + 0.5 n, far edge 1.0 + 0.5 n <= 9.063 -> n <= 16
    const ens = synthesizeBeamEnsemble(spec({ nBins: 22, blankM: 0.5, binM: 0.5, pitchDeg: 0, rollDeg: 0 }));
    const r = ok(processEnsemble(ens, SENSOR, { depthM: 10.35, reefAxisDeg: 270 }));
    expect(r.binFlags.lastIndexOf(1)).toBe(16);
    expect(r.binFlags.slice(17).every((f) => f === 4)).toBe(true);
    // with Hm0_ss = 1 m, D_eff = 9.5 m, limit 8.610 m -> n <= 15
    const w = ok(processEnsemble(ens, SENSOR, { depthM: 10.35, hm0SsM: 1, reefAxisDeg: 270 }));
    expect(w.binFlags.lastIndexOf(1)).toBe(15);
  });
});

describe('bin QC thresholds (docs/methods/currents.md 5.4, engineering defaults)', () => {
  it('correlation below 50 % on one beam gives a three-beam bin (3), on two beams a failed bin (4)', () => {
    const one = ok(processEnsemble({ ...ENS, corrPct: setCell(ENS.corrPct ?? [], 3, 2, 49) }, SENSOR, CTX));
    expect(one.binFlags[3]).toBe(3);
    const two = setCell(setCell(ENS.corrPct ?? [], 3, 2, 49), 3, 0, 30);
    expect(ok(processEnsemble({ ...ENS, corrPct: two }, SENSOR, CTX)).binFlags[3]).toBe(4);
    expect(
      ok(processEnsemble({ ...ENS, corrPct: setCell(ENS.corrPct ?? [], 3, 2, 50) }, SENSOR, CTX)).binFlags[3],
    ).toBe(1);
  });

  it('percent good below 25 % marks the beam bad', () => {
    const pg = ENS.velMS.map(() => [100, 100, 100, 100]);
    pg[6] = [100, 24, 100, 100];
    expect(ok(processEnsemble({ ...ENS, pgPct: pg }, SENSOR, CTX)).binFlags[6]).toBe(3);
  });

  it('bins at and beyond the surface echo peak fail on all beams', () => {
    // echo falls 3 counts per bin from 150; a surface peak of +40 counts at bin 12
    const echo = (ENS.echo ?? []).map((row, n) => row.map((x) => (n >= 12 ? x + 40 : x)));
    const r = ok(processEnsemble({ ...ENS, echo }, SENSOR, CTX));
    expect(r.binFlags[11]).toBe(1);
    expect(r.binFlags.slice(12).every((f) => f === 4)).toBe(true);
    // a rise of 15 counts (< 20) is not taken for a boundary
    const small = (ENS.echo ?? []).map((row, n) => row.map((x) => (n >= 12 ? x + 18 : x)));
    expect(ok(processEnsemble({ ...ENS, echo: small }, SENSOR, CTX)).binFlags[12]).toBe(1);
  });

  it('one beam above the four-beam median by > 30 counts is suspect (3)', () => {
    const r = ok(processEnsemble({ ...ENS, echo: setCell(ENS.echo ?? [], 2, 1, 150 - 6 + 31) }, SENSOR, CTX));
    expect(r.binFlags[2]).toBe(3);
    // a one-beam target is not the surface: the bins beyond it stay good
    expect(r.binFlags[3]).toBe(1);
    const q = ok(processEnsemble({ ...ENS, echo: setCell(ENS.echo ?? [], 2, 1, 150 - 6 + 30) }, SENSOR, CTX));
    expect(q.binFlags[2]).toBe(1);
  });

  it('error velocity: 0.04 passes, 0.08 is suspect, 0.2 fails (and then too few bins remain)', () => {
    expect(ok(processEnsemble(synthesizeBeamEnsemble(spec({ errorMS: 0.04 })), SENSOR, CTX)).flag).toBe(1);
    const s = ok(processEnsemble(synthesizeBeamEnsemble(spec({ errorMS: 0.08 })), SENSOR, CTX));
    expect(s.flag).toBe(3);
    expect(s.binFlags[0]).toBe(3);
    const f = processEnsemble(synthesizeBeamEnsemble(spec({ errorMS: 0.2 })), SENSOR, CTX);
    expect(f.ok).toBe(false);
    expect(f.flag).toBe(4);
    if (!f.ok) expect(f.code).toBe('REEFD_CURRENTS_TOO_FEW_BINS');
  });

  it('vertical velocity above 0.10 m/s is suspect', () => {
    const r = ok(
      processEnsemble(synthesizeBeamEnsemble(spec({ profile: () => [0.1, 0, 0.12] })), SENSOR, CTX),
    );
    expect(r.binFlags[0]).toBe(3);
    const q = ok(
      processEnsemble(synthesizeBeamEnsemble(spec({ profile: () => [0.1, 0, 0.09] })), SENSOR, CTX),
    );
    expect(q.binFlags[0]).toBe(1);
  });

  it('horizontal speed: 1.6 m/s suspect, 3.2 m/s fails', () => {
    const s = ok(processEnsemble(synthesizeBeamEnsemble(spec({ profile: () => [1.6, 0, 0] })), SENSOR, CTX));
    expect(s.binFlags[0]).toBe(3);
    const f = processEnsemble(synthesizeBeamEnsemble(spec({ profile: () => [0, -3.2, 0] })), SENSOR, CTX);
    expect(f.ok).toBe(false);
  });

  it('tilt above 10 deg makes the bins suspect; above 20 deg the frame fell over (flag 4, reason tilt)', () => {
    const s = ok(processEnsemble(synthesizeBeamEnsemble(spec({ pitchDeg: 12, rollDeg: 0 })), SENSOR, CTX));
    expect(s.flag).toBe(3);
    expect(s.binFlags[0]).toBe(3);
    // acos(cos 15 cos 15) = 21.1 deg
    const f = processEnsemble(synthesizeBeamEnsemble(spec({ pitchDeg: 15, rollDeg: 15 })), SENSOR, CTX);
    expect(f).toMatchObject({ ok: false, flag: 4, reason: 'tilt', code: 'REEFD_CURRENTS_TILT' });
  });

  it('thresholds are configurable per sensor', () => {
    const strict: AdcpSensorConfig = { ...SENSOR, qc: { errSuspectMS: 0.02 } };
    expect(ok(processEnsemble(synthesizeBeamEnsemble(spec({ errorMS: 0.03 })), strict, CTX)).flag).toBe(3);
  });
});

describe('instrument and earth coordinates', () => {
  it('inst: (x, y, z, e) at heading 90 is rotated; a null error velocity is "not evaluated" (worked by hand)', () => {
    const ens: AdcpEnsemble = {
      coord: 'inst',
      blankM: 0.1,
      binM: 0.1,
      velMS: Array.from({ length: 15 }, () => [0, 0.2, 0, null]),
      headingDeg: 90,
      pitchDeg: 0,
      rollDeg: 0,
    };
    const r = ok(processEnsemble(ens, SENSOR, CTX));
    expect(r.eastMS).toBeCloseTo(0.2 * (1 - 0.5 / (7 * 2.35)), 14);
    expect(r.flag).toBe(1);
    const bad = ok(
      processEnsemble(
        { ...ens, velMS: ens.velMS.map((row, n) => (n === 2 ? [0, null, 0, 0] : row)) },
        SENSOR,
        CTX,
      ),
    );
    expect(bad.binFlags[2]).toBe(4);
  });

  it('earth: values pass straight to the average; no attitude needed (definition)', () => {
    const ens: AdcpEnsemble = {
      coord: 'earth',
      blankM: 0.1,
      binM: 0.1,
      velMS: Array.from({ length: 15 }, () => [-0.1, 0.1, 0, 0]),
    };
    const r = ok(processEnsemble(ens, SENSOR, CTX));
    expect(r.dirToDeg).toBeCloseTo(315, 12);
    expect(r.uMS).toBeCloseTo(0.1 * (1 - 0.5 / (7 * 2.35)), 14);
  });
});

describe('depth source and failures', () => {
  it('without a station depth, h comes from the ADCP pressure; p_atm defaulted flags 3 (docs/methods/conventions.md 1.5; docs/methods/qc.md 7.4)', () => {
    // 2.05 m of water above the head at rho 1025, g 9.80665: p - p_atm = 2.05 * 1025 * 9.80665 / 1e4 dbar
    const dp = (2.05 * 1025 * 9.80665) / 1e4;
    const r = ok(processEnsemble({ ...ENS, presDbar: 10.1325 + dp }, SENSOR, { reefAxisDeg: 270 }));
    expect(r.depthM).toBeCloseTo(2.4, 12);
    expect(r.depthSource).toBe('adcp');
    expect(r.flag).toBe(3);
    const withBaro = ok(
      processEnsemble({ ...ENS, presDbar: 10.0 + dp }, SENSOR, { reefAxisDeg: 270, patmDbar: 10.0 }),
    );
    expect(withBaro.depthM).toBeCloseTo(2.4, 12);
    expect(withBaro.flag).toBe(1);
  });

  it('the station depth wins; a disagreement over 0.05 m with the ADCP is suspect (docs/methods/qc.md 7.2)', () => {
    const dp = (2.0 * 1025 * 9.80665) / 1e4; // the ADCP says 2.35 m
    const agree = ok(processEnsemble({ ...ENS, presDbar: 10.1325 + dp }, SENSOR, { ...CTX, depthM: 2.38 }));
    expect(agree.depthSource).toBe('pressure');
    expect(agree.depthM).toBe(2.38);
    expect(agree.flag).toBe(1);
    const off = ok(processEnsemble({ ...ENS, presDbar: 10.1325 + dp }, SENSOR, { ...CTX, depthM: 2.45 }));
    expect(off.flag).toBe(3);
  });

  it('stable codes: no depth (9), no attitude (9), head dry (4), too few bins (4), bad shape (4)', () => {
    expect(processEnsemble(ENS, SENSOR, { reefAxisDeg: 270 })).toMatchObject({
      ok: false,
      flag: 9,
      code: 'REEFD_CURRENTS_NO_DEPTH',
    });
    const { headingDeg: _h, ...noHeading } = ENS;
    expect(processEnsemble(noHeading, SENSOR, CTX)).toMatchObject({
      ok: false,
      flag: 9,
      reason: 'no_attitude',
    });
    expect(processEnsemble(ENS, SENSOR, { ...CTX, depthM: 0.3 })).toMatchObject({
      ok: false,
      code: 'REEFD_CURRENTS_HEAD_DRY',
    });
    // h = 0.75 m: D = 0.4, the side-lobe limit keeps two bins, and bed to their top is > 40 % of h: valid
    expect(processEnsemble(ENS, SENSOR, { ...CTX, depthM: 0.75 }).ok).toBe(true);
    // h = 5 m with only the two lowest bins valid: the profile reaches ~0.6 m, 13 % of h < 40 %
    const lowOnly = { ...ENS, velMS: ENS.velMS.map((b, i) => (i < 2 ? b : [null, null, null, null])) };
    expect(processEnsemble(lowOnly, SENSOR, { ...CTX, depthM: 5 })).toMatchObject({
      ok: false,
      flag: 4,
      reason: 'too_few_bins',
    });
    // one valid bin is never enough
    const oneBin = { ...ENS, velMS: ENS.velMS.map((b, i) => (i < 1 ? b : [null, null, null, null])) };
    expect(processEnsemble(oneBin, SENSOR, { ...CTX, depthM: 0.75 })).toMatchObject({
      ok: false,
      reason: 'too_few_bins',
    });
    expect(processEnsemble({ ...ENS, velMS: [[0, 0, 0]] }, SENSOR, CTX)).toMatchObject({
      ok: false,
      code: 'REEFD_CURRENTS_SHAPE',
    });
    expect(processEnsemble({ ...ENS, binM: 0 }, SENSOR, CTX)).toMatchObject({
      ok: false,
      code: 'REEFD_CURRENTS_SHAPE',
    });
  });

  it('an ensemble shorter than 5 min is suspect (docs/methods/currents.md 5.5)', () => {
    expect(ok(processEnsemble({ ...ENS, durationS: 120 }, SENSOR, CTX)).flag).toBe(3);
    expect(ok(processEnsemble({ ...ENS, durationS: 600 }, SENSOR, CTX)).flag).toBe(1);
  });
});

describe('bed stress and uncertainty (docs/methods/currents.md 5.6; docs/methods/uncertainty.md 9.2)', () => {
  it('tau_b = rho Cd U^2 with Cd 0.03 by default, or the log-law Cd for a given z0', () => {
    const r = ok(processEnsemble(ENS, SENSOR, CTX));
    expect(r.tauBedPa).toBeCloseTo(1025 * 0.03 * r.speedMS * r.speedMS, 14);
    const z0 = ok(processEnsemble(ENS, SENSOR, { ...CTX, z0M: 2.35 / Math.exp(5), rhoKgM3: 1022 }));
    expect(z0.tauBedPa).toBeCloseTo(1022 * (0.41 / 4) ** 2 * z0.speedMS * z0.speedMS, 14);
  });

  it('sigma^2 = sigma_ping^2/N + (0.01 U)^2 + (U sigma_heading)^2 + sigma_ext^2 (docs/methods/uncertainty.md 9.2)', () => {
    const uniform = ok(processEnsemble(ENS, { ...SENSOR, pingSigmaMS: 0.1, pingsPerEnsemble: 400 }, CTX));
    const power = ok(processEnsemble(ENS, { ...SENSOR, topExtrapolation: 'power' }, CTX));
    const ext2 = ((power.eastMS - uniform.eastMS) / 2) ** 2 + ((power.northMS - uniform.northMS) / 2) ** 2;
    expect(ext2).toBeGreaterThan(0);
    const u = uniform.speedMS;
    const expected = Math.sqrt(0.01 / 400 + (0.01 * u) ** 2 + (u * 2 * DEG) ** 2 + ext2);
    expect(uniform.sigmaMS).toBeCloseTo(expected, 14);
  });
});

describe('instrument beam numbering and sign (docs/methods/currents.md 5.1)', () => {
  it('a head numbering the beams 3, 4, 1, 2 and positive towards itself reads the same flow (algebra)', () => {
    // the message carries [-b3, -b4, -b1, -b2] of this project's beams
    const velMS = ENS.velMS.map((r) => [-(r[2] ?? 0), -(r[3] ?? 0), -(r[0] ?? 0), -(r[1] ?? 0)]);
    const corrPct = setCell(ENS.corrPct ?? [], 3, 3, 10); // message beam 4 = project beam 2
    const mapped: AdcpSensorConfig = { ...SENSOR, beamMap: [2, 3, 0, 1], beamSign: -1 };
    const a = ok(processEnsemble({ ...ENS, corrPct: setCell(ENS.corrPct ?? [], 3, 1, 10) }, SENSOR, CTX));
    const b = ok(processEnsemble({ ...ENS, velMS, corrPct }, mapped, CTX));
    expect(b.eastMS).toBeCloseTo(a.eastMS, 14);
    expect(b.northMS).toBeCloseTo(a.northMS, 14);
    expect(b.binFlags).toEqual(a.binFlags);
    // unmapped, the same message gives a different (wrong) current
    // (x and y swap: the current towards 71.6 deg reads as towards 38.4 deg)
    const wrong = ok(processEnsemble({ ...ENS, velMS }, SENSOR, CTX));
    expect(Math.abs(wrong.dirToDeg - a.dirToDeg)).toBeGreaterThan(30);
    expect(processEnsemble(ENS, { ...SENSOR, beamMap: [0, 0, 2, 3] }, CTX)).toMatchObject({
      ok: false,
      code: 'REEFD_CURRENTS_CONFIG',
    });
  });
});
