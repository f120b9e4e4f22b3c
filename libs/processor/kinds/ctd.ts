// CTD: temperature and salinity, QC'd and kept per station. Nearly every other derivation reads them
// (derive.ts ctdAt), so CTD messages are released first among messages of one time.
import { atSampleTime, defineKind } from './types.js';

export const ctd = defineKind({
  kind: 'ctd',
  order: 0,
  qcVariables: ['temp_c', 'sal'],
  writes: { station: ['temp', 'sal'], site: [] },
  reads: { station: [], site: [] },
  completeMs: atSampleTime,
  derive(m, io) {
    const ft = io.qc('ctd.temp_c', 'temp_c', m.temp_c);
    const fs = io.qc('ctd.sal', 'sal', m.sal);
    io.put('temp', m.tMs, m.temp_c, ft);
    io.put('sal', m.tMs, m.sal, fs);
  },
});
