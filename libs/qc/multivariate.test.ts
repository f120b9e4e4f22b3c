import { describe, it, expect } from 'vitest';
import {
  adcpTilt,
  depthAgreement,
  neighbourDifference,
  o2SaturationFault,
  pco2LowFault,
  salinityBubble,
  sensorExposed,
  temperatureAgreement,
} from './index.js';

describe('multi-variate checks', () => {
  it('ADCP tilt: acos(cos p cos r), 3 above 10 deg, 4 above 20 deg (docs/methods/currents.md 5.4)', () => {
    const t = adcpTilt(3, 4);
    expect(t.value).toBeCloseTo(4.998537, 5); // algebra: acos(cos 3 deg cos 4 deg)
    expect(t.flag).toBe(1);
    expect(adcpTilt(8, 8).flag).toBe(3); // 11.3 deg
    const fallen = adcpTilt(15, 15);
    expect(fallen.value).toBeCloseTo(21.0906, 3);
    expect(fallen.flag).toBe(4); // the frame has fallen over
    expect(adcpTilt(Number.NaN, 0).flag).toBe(9);
  });
  it('sensor exposed when the water depth falls to the sensor height', () => {
    expect(sensorExposed(0.18, 0.2)).toEqual({ flag: 4, value: expect.closeTo(-0.02, 10) });
    expect(sensorExposed(0.23, 0.2).flag).toBe(3);
    expect(sensorExposed(1.4, 0.2).flag).toBe(1);
  });
  it('sensor-fault plausibility: O2 above 200 % saturation, pCO2 below 100 uatm (engineering defaults)', () => {
    expect(o2SaturationFault(215).flag).toBe(4);
    expect(o2SaturationFault(180).flag).toBe(1);
    expect(pco2LowFault(85).flag).toBe(4);
    expect(pco2LowFault(160).flag).toBe(1);
  });
  it('agreement between co-located and neighbouring sensors (docs/methods/qc.md 7.2 test 9)', () => {
    expect(temperatureAgreement([27.1, 27.3, 27.7])).toEqual({ flag: 3, value: expect.closeTo(0.6, 10) });
    expect(temperatureAgreement([27.1, Number.NaN, 27.4]).flag).toBe(1);
    expect(temperatureAgreement([27.1]).flag).toBe(2);
    expect(depthAgreement(1.52, 1.45).flag).toBe(3);
    expect(depthAgreement(1.52, 1.49).flag).toBe(1);
    expect(neighbourDifference(0.9, 0.15)).toEqual({ flag: 3, value: expect.closeTo(6, 10) });
    expect(neighbourDifference(0.6, 0.15).flag).toBe(1);
    expect(salinityBubble(4, 0.01).flag).toBe(3);
    expect(salinityBubble(4, 0.4).flag).toBe(1);
    expect(salinityBubble(1, 0.0).flag).toBe(1);
  });
});
