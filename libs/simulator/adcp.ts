// ADCP ensembles as an up-looking 4-beam Janus instrument reports them in beam coordinates: a power-law
// velocity profile (u = U_bar (m+1)/m (z/h)^(1/m), m = 6, Chen 1991, J. Hydraul. Eng. 117; its depth mean is
// U_bar exactly) rotated into the tilted, turned instrument and projected onto the beams, with the
// near-surface layer spoilt as real side lobes spoil it (science 5.3): bins beyond D cos(theta) biased,
// bins beyond the surface noise with low correlation, echo intensity peaking at the surface.
import { earthToInstrument, instrumentToBeam, janusHead } from '../currents/index.js';
import type { Rng } from './prng.js';

export interface AdcpSetup {
  heightM: number;
  beamAngleDeg: number;
  convex: boolean;
  /** Declination plus alignment offset: true heading = compass heading + this (science 5.2). */
  declinationDeg: number;
  blankM: number;
  binM: number;
  bins: number;
  /** Deployment attitude: compass heading and tilts (deg). */
  compassHeadingDeg: number;
  pitchDeg: number;
  rollDeg: number;
}

export interface AdcpEnsembleOut {
  vel: (number | null)[][];
  corr: number[][];
  echo: number[][];
  headingDeg: number;
  pitchDeg: number;
  rollDeg: number;
}

const round = (x: number, dp: number) => Math.round(x * 10 ** dp) / 10 ** dp;

/** One 10-min ensemble for depth-averaged east/north velocity, water depth depthM and sea-swell Hm0. */
export function adcpEnsemble(
  setup: AdcpSetup,
  depthM: number,
  eastMS: number,
  northMS: number,
  hm0M: number,
  rng: Rng,
): AdcpEnsembleOut {
  const m = 6;
  const theta = (setup.beamAngleDeg * Math.PI) / 180;
  const dRange = depthM - setup.heightM; // range to the surface
  const sideLobe = dRange * Math.cos(theta);
  const heading = setup.compassHeadingDeg + 0.4 * rng.normal();
  const pitch = setup.pitchDeg + 0.15 * rng.normal();
  const roll = setup.rollDeg + 0.15 * rng.normal();
  const trueHeading = heading + setup.declinationDeg;
  const head = janusHead(setup.beamAngleDeg, setup.convex);
  const attitude = { headingDeg: trueHeading, pitchDeg: pitch, rollDeg: roll };
  const vel: (number | null)[][] = [];
  const corr: number[][] = [];
  const echo: number[][] = [];
  for (let n = 0; n < setup.bins; n++) {
    const r = setup.blankM + setup.binM / 2 + n * setup.binM;
    const z = setup.heightM + r;
    const top = r + setup.binM / 2;
    const beamE: number[] = [];
    const beamC: number[] = [];
    let beams: number[];
    if (r > dRange + setup.binM / 2) {
      // Above the surface: the echo is the surface's own reflection and noise.
      beams = [0, 1, 2, 3].map(() => 0.35 * rng.normal());
      for (let b = 0; b < 4; b++) {
        beamC.push(round(18 + 12 * rng.next(), 1));
        beamE.push(Math.round(Math.max(20, 170 - 60 * (r - dRange) + 6 * rng.normal())));
      }
    } else {
      const zRel = Math.min(Math.max(z / depthM, 1e-3), 1);
      const shape = ((m + 1) / m) * zRel ** (1 / m);
      const enu = [eastMS * shape, northMS * shape, 0.002 * rng.normal(), 0];
      beams = Array.from(instrumentToBeam(earthToInstrument(enu, attitude), head));
      const spoilt = top > sideLobe;
      for (let b = 0; b < 4; b++) {
        beams[b] =
          (beams[b] as number) + 0.006 * rng.normal() + (spoilt ? 0.08 * hm0M * rng.normal() + 0.03 : 0);
        beamC.push(round(spoilt ? 45 + 20 * rng.next() : 88 + 6 * rng.next(), 1));
        // Echo falls with range in the water and rises towards the surface (peak ~ 180 counts).
        const nearSurface = Math.exp(-((dRange - r) ** 2) / (2 * 0.12 ** 2));
        beamE.push(Math.round(92 - 12 * r + 95 * nearSurface + 2 * rng.normal()));
      }
    }
    vel.push(beams.map((v) => round(Math.max(-19.9, Math.min(19.9, v)), 4)));
    corr.push(beamC);
    echo.push(beamE.map((e) => Math.max(0, Math.min(1000, e))));
  }
  const wrap = (x: number) => ((x % 360) + 360) % 360;
  return {
    vel,
    corr,
    echo,
    headingDeg: round(wrap(heading), 2),
    pitchDeg: round(pitch, 2),
    rollDeg: round(roll, 2),
  };
}
