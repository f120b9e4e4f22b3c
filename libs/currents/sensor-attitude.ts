// A sensor's attitude in the conventions of transforms.ts (reefd docs/methods/currents.md 5.2): heading corrected
// for declination and alignment, optional gimbal pitch, and the down-looking flip.
//
// Down-looking heads: the head is taken as an up-looking one rolled over by 180 deg about its +y
// axis, so z (out of the face) points down, +x reverses, and +y and the heading keep their meaning.
// A level down-looking head reports pitch = roll = 0; the rotation uses roll + 180 deg. Instruments
// whose tilt sensors refer to another frame are mapped onto this one in their configuration and
// proved with a known-flow test (docs/methods/currents.md, instrument conventions).
import { gimbalPitchDeg, rotationMatrix, totalTiltDeg } from './transforms.js';
import type { AdcpSensorConfig } from './types.js';

/** Pitch and roll as the head's frame sees them (gimbal-corrected when configured), deg. */
export function sensorPitchDeg(sensor: AdcpSensorConfig, pitchDeg: number, rollDeg: number): number {
  return sensor.independentTilt === true ? gimbalPitchDeg(pitchDeg, rollDeg) : pitchDeg;
}

/**
 * Instrument -> earth rotation of a sensor for reported compass heading, pitch and roll (deg), row-major
 * 3 x 3 (see rotationMatrix). Heading = compass + declination (east positive) + alignment offset.
 * Check (worked by hand): down-looking, level, heading 0: instrument +x points west, +z down.
 */
export function sensorRotationMatrix(
  sensor: AdcpSensorConfig,
  headingDeg: number,
  pitchDeg: number,
  rollDeg: number,
  out: Float64Array = new Float64Array(9),
): Float64Array {
  const h = headingDeg + (sensor.declinationDeg ?? 0) + (sensor.headingOffsetDeg ?? 0);
  const p = sensorPitchDeg(sensor, pitchDeg, rollDeg);
  const r = sensor.orientation === 'down' ? rollDeg + 180 : rollDeg;
  return rotationMatrix(h, p, r, out);
}

/** Total tilt of the sensor from its level attitude, deg (docs/methods/currents.md 5.4). */
export function sensorTiltDeg(sensor: AdcpSensorConfig, pitchDeg: number, rollDeg: number): number {
  return totalTiltDeg(sensorPitchDeg(sensor, pitchDeg, rollDeg), rollDeg);
}
