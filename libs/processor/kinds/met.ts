// Met mast: wind and barometric pressure (QC'd), and the air's CO2 mole fraction, kept site-wide for the
// barometric corrections (derive.ts baroAt) and the air-sea exchange of the flux windows.
import { atSampleTime, defineKind } from './types.js';

export const met = defineKind({
  kind: 'met',
  order: 1,
  qcVariables: ['wind_m_s', 'baro_hpa'],
  writes: { station: [], site: ['wind', 'baro', 'xco2'] },
  reads: { station: [], site: [] },
  completeMs: atSampleTime,
  derive(m, io) {
    const fw = io.qc('met.wind_m_s', 'wind_m_s', m.wind_m_s);
    const fb = io.qc('met.baro_hpa', 'baro_hpa', m.baro_hpa);
    io.putSite('wind', m.tMs, m.wind_m_s, fw);
    io.putSite('baro', m.tMs, m.baro_hpa, fb);
    io.putSite('xco2', m.tMs, m.xco2_air_ppm, 1);
  },
});
