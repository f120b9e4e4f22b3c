// PAR: photosynthetically active radiation, QC'd, kept site-wide from the site's light sensor (the light of
// the metabolism, light.ts) and emitted as a `light` record per sample of every PAR sensor (docs/contract-v1.md,
// records), so the light is in every output.
import type { LightRecord } from '../../contract/index.js';
import { siteLightSensor } from '../light.js';
import { atSampleTime, defineKind } from './types.js';

export const par = defineKind({
  kind: 'par',
  order: 5,
  qcVariables: ['par_umol_m2_s'],
  writes: { station: [], site: ['par'] },
  reads: { station: [], site: [] },
  completeMs: atSampleTime,
  derive(m, io) {
    const f = io.qc('par.par_umol_m2_s', 'par_umol_m2_s', m.par_umol_m2_s);
    // One sensor is the site's light (light.ts): a second PAR sensor reporting at the same times would
    // otherwise overwrite its samples in the site series.
    if (siteLightSensor(io.ctx.config) === `${m.station}/${m.sensor}`)
      io.putSite('par', m.tMs, m.par_umol_m2_s, f);
    const record: LightRecord = {
      type: 'light',
      site: io.ctx.config.site,
      t: m.t,
      station: m.station,
      sensor: m.sensor,
      par_umol_m2_s: m.par_umol_m2_s,
      flag: f,
    };
    io.emit(record);
    io.observe(record, f);
  },
});
