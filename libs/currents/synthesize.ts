// Synthetic beam-coordinate ensembles from a known earth-frame profile, by the exact inverse of the
// processing transforms (earth -> instrument -> beam, transforms.ts, sensor-attitude.ts). For tests
// and the fictional-reef simulator; pure and deterministic (noise, if any, is the caller's).
import { binHeightM, binRangeM } from './geometry.js';
import { sensorPitchDeg, sensorRotationMatrix } from './sensor-attitude.js';
import { earthToInstrument, instrumentToBeam, janusHead } from './transforms.js';
import type { AdcpEnsemble, AdcpSensorConfig } from './types.js';

export interface SynthesisSpec {
  readonly sensor: AdcpSensorConfig;
  readonly nBins: number;
  readonly blankM: number;
  readonly binM: number;
  /** compass heading, pitch, roll as the instrument would report them, deg */
  readonly headingDeg: number;
  readonly pitchDeg: number;
  readonly rollDeg: number;
  /** earth velocity (east, north, up) in m/s at height z above the bed, m */
  readonly profile: (zM: number) => readonly [number, number, number];
  /** error velocity to add to every bin, m/s (default 0: homogeneous flow) */
  readonly errorMS?: number;
  /** correlation, % (default 90), and echo at bin 1, counts (default 150, falling 3 counts per bin) */
  readonly corrPct?: number;
  readonly echo1?: number;
}

/** A beam-coordinate ensemble whose processing returns `profile` at the bin heights. */
export function synthesizeBeamEnsemble(spec: SynthesisSpec): AdcpEnsemble {
  const { sensor } = spec;
  const head = janusHead(sensor.beamAngleDeg ?? 20, sensor.convex ?? true);
  const rot = sensorRotationMatrix(sensor, spec.headingDeg, spec.pitchDeg, spec.rollDeg);
  const pitch = sensorPitchDeg(sensor, spec.pitchDeg, spec.rollDeg);
  const earth = new Float64Array(4);
  const inst = new Float64Array(4);
  const beam = new Float64Array(4);
  const velMS: number[][] = [];
  const corrPct: number[][] = [];
  const echo: number[][] = [];
  for (let n = 0; n < spec.nBins; n++) {
    const r = binRangeM(n, spec.blankM, spec.binM, sensor.firstBinRangeM);
    const z = binHeightM(r, sensor.heightM, sensor.orientation, pitch, spec.rollDeg);
    const [e, nn, u] = spec.profile(z);
    earth[0] = e;
    earth[1] = nn;
    earth[2] = u;
    earth[3] = spec.errorMS ?? 0;
    earthToInstrument(earth, rot, inst);
    instrumentToBeam(inst, head, beam);
    velMS.push(Array.from(beam));
    const c = spec.corrPct ?? 90;
    corrPct.push([c, c, c, c]);
    const ec = (spec.echo1 ?? 150) - 3 * n;
    echo.push([ec, ec, ec, ec]);
  }
  return {
    coord: 'beam',
    blankM: spec.blankM,
    binM: spec.binM,
    velMS,
    headingDeg: spec.headingDeg,
    pitchDeg: spec.pitchDeg,
    rollDeg: spec.rollDeg,
    corrPct,
    echo,
  };
}
