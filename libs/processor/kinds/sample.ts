// Bottle samples: lab TA, DIC and salinity kept per station, for TA from samples (derive.ts taFor) and the
// TA budget of the flux windows. A sample's arrival feeds the alert engine's stale tracker only.
import { ctdAt } from '../derive.js';
import { atSampleTime, defineKind } from './types.js';

export const sample = defineKind({
  kind: 'sample',
  order: 3,
  qcVariables: [],
  writes: { station: ['sampleTa', 'sampleDic', 'sampleSal'], site: [] },
  reads: { station: ['temp', 'sal'], site: [] },
  completeMs: atSampleTime,
  derive(m, io) {
    io.alert('sample.received', 1, 1);
    if (m.ta_umol_kg !== undefined) io.put('sampleTa', m.tMs, m.ta_umol_kg, 1);
    if (m.dic_umol_kg !== undefined) io.put('sampleDic', m.tMs, m.dic_umol_kg, 1);
    // A bottle without its own salinity takes the station CTD's at its time (docs/methods/carbonate.md 3.6).
    const sal = m.sal ?? ctdAt(io.ctx, m.station, m.tMs)?.sal.value;
    if (sal !== undefined) io.put('sampleSal', m.tMs, sal, 1);
  },
});
