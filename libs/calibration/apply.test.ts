import { describe, expect, it } from 'vitest';
import type { PressureMessage, Pco2Message } from '../contract/index.js';
import { applyCalibration, compileCalibration, createCalibrationState } from './apply.js';
import { calibrationFileSchema } from './schema.js';

const T0 = Date.UTC(2026, 6, 14);
const DAY = 86_400_000;
const pco2 = (tMs: number, v: number): Pco2Message => ({
  v: 1,
  t: new Date(tMs).toISOString(),
  tMs,
  site: 's',
  station: 'back',
  sensor: 'co2',
  kind: 'pco2',
  pco2_uatm: v,
  temp_c: 27,
});
const table = (raw: unknown) => compileCalibration(calibrationFileSchema.parse(raw));

describe('applyCalibration', () => {
  it('applies (slope + slope_drift x days) x raw + offset + drift x days, days from `from` (contract E2)', () => {
    const t = table([
      {
        sensor: 'back/co2',
        field: 'pco2_uatm',
        from: '2026-07-14T00:00:00Z',
        slope: 1.02,
        offset: -12,
        drift_per_day: 0.5,
        slope_drift_per_day: 0.001,
      },
    ]);
    const m = pco2(T0 + 2.5 * DAY, 450);
    const r = applyCalibration(t, createCalibrationState(), m);
    // by hand: (1.02 + 0.001 x 2.5) x 450 - 12 + 0.5 x 2.5 = 460.125 - 12 + 1.25 = 449.375
    expect(r.message.pco2_uatm).toBeCloseTo(449.375, 10);
    expect(r.calibrated).toBe(true);
    expect(r.fields).toEqual(['pco2_uatm']);
    expect(m.pco2_uatm).toBe(450); // the raw message is not changed
    expect(r.message.temp_c).toBe(27);
  });

  it('honours from (inclusive) and to (exclusive); outside them the message is returned as is', () => {
    const t = table([
      {
        sensor: 'back/co2',
        field: 'pco2_uatm',
        from: '2026-07-14T00:00:00Z',
        to: '2026-07-15T00:00:00Z',
        offset: -10,
      },
    ]);
    const st = createCalibrationState();
    expect(applyCalibration(t, st, pco2(T0, 400)).message.pco2_uatm).toBe(390);
    const end = applyCalibration(t, st, pco2(T0 + DAY, 400));
    expect(end.calibrated).toBe(false);
    expect(end.message.pco2_uatm).toBe(400);
    expect(applyCalibration(t, st, pco2(T0 - 1, 400)).calibrated).toBe(false);
  });

  it('without `from` counts days from the sensor first sample, remembered in the state', () => {
    const t = table([{ sensor: 'back/co2', field: 'pco2_uatm', drift_per_day: -2 }]);
    const st = createCalibrationState();
    expect(applyCalibration(t, st, pco2(T0 + DAY, 400)).message.pco2_uatm).toBe(400);
    expect(st.firstMs['back/co2']).toBe(T0 + DAY);
    expect(applyCalibration(t, st, pco2(T0 + 3 * DAY, 400)).message.pco2_uatm).toBeCloseTo(396, 10);
  });

  it('corrects each sample of a pressure burst and keeps the logger nulls', () => {
    const t = table([{ sensor: 'crest/p1', field: 'p_dbar', offset: -0.05 }]);
    const m = {
      v: 1,
      t: '2026-07-14T00:00:00Z',
      tMs: T0,
      site: 's',
      station: 'crest',
      sensor: 'p1',
      kind: 'pressure',
      fs_hz: 2,
      p_dbar: [11.5, null, 11.7],
    } as PressureMessage;
    const r = applyCalibration(t, createCalibrationState(), m);
    expect(r.message.p_dbar[0]).toBeCloseTo(11.45, 12);
    expect(r.message.p_dbar[1]).toBeNull();
    expect(r.message.p_dbar[2]).toBeCloseTo(11.65, 12);
  });

  it('leaves other sensors and absent fields alone', () => {
    const t = table([{ sensor: 'back/o2', field: 'o2_umol_l', slope: 1.1 }]);
    const m = pco2(T0, 400);
    const r = applyCalibration(t, createCalibrationState(), m);
    expect(r.message).toBe(m);
    expect(r.calibrated).toBe(false);
    const t2 = table([{ sensor: 'back/co2', field: 'temp_c', offset: 1 }]);
    const noTemp = { ...pco2(T0, 400) };
    delete noTemp.temp_c;
    expect(applyCalibration(t2, createCalibrationState(), noTemp).calibrated).toBe(false);
  });
});
