// Pressure logger: waves and mean depth from each burst (docs/methods/waves.md 4.1-4.6), a `waves` record per burst,
// and the depth and sea-swell height series that the flux windows and the ADCP's depth average read.
import type { PressureMessage, WavesRecord } from '../../contract/index.js';
import { densityEos80 } from '../../seawater/index.js';
import { analyzeBurst } from '../../waves/index.js';
import { baroAt, ctdAt, worst, type DeriveContext } from '../derive.js';
import { defineKind } from './types.js';

/** A burst is stamped at its first sample and complete at its last, ms. */
const burstCompleteMs = (m: PressureMessage): number =>
  m.tMs + Math.round(((m.p_dbar.length - 1) / m.fs_hz) * 1000);

export const pressure = defineKind({
  kind: 'pressure',
  order: 2,
  qcVariables: ['depth_m'],
  writes: { station: ['depth', 'hm0ss', 'depthDone', 'hm0ssDone', 'burstCentre'], site: [] },
  reads: { station: ['temp', 'sal'], site: ['baro'] },
  completeMs: burstCompleteMs,
  derive(m, io) {
    if (io.sensorConfig === undefined) return;
    const r = deriveWaves(io.ctx, m, io.sensorConfig.height_m);
    const tC = Date.parse(r.record.t);
    let f = r.flag;
    if (r.depthM !== null) {
      f = Math.max(f, io.qc('waves.depth_m', 'depth_m', r.depthM));
      io.put('depth', tC, r.depthM, f);
    }
    if (r.hm0SsM !== null) io.put('hm0ss', tC, r.hm0SsM, f);
    // Stamped at completion too: an ensemble may use a burst only once the burst is complete.
    const done = burstCompleteMs(m);
    if (r.depthM !== null) {
      io.put('depthDone', done, r.depthM, f);
      io.put('burstCentre', done, tC, f);
    }
    if (r.hm0SsM !== null) io.put('hm0ssDone', done, r.hm0SsM, f);
    r.record.flag = f;
    io.emit(r.record);
    // Every observation of one message carries the message time, so the stale tracker learns the sensor's
    // real interval.
    io.observe(r.record, f);
  },
});

type WavesBase = Pick<WavesRecord, 'type' | 'site' | 't' | 'station' | 'sensor'>;
type BurstFailure = Extract<ReturnType<typeof analyzeBurst>, { ok: false }>;
type WavesResult = { record: WavesRecord; flag: number; depthM: number | null; hm0SsM: number | null };

/** The record of a burst the waves library refused: no wave statistics; the depth unless it fell dry. */
function failedBurst(base: WavesBase, r: BurstFailure): WavesResult {
  const record: WavesRecord = {
    ...base,
    hm0_m: null,
    tp_s: null,
    tm01_s: null,
    tm02_s: null,
    hrms_m: null,
    hm0_ss_m: null,
    hm0_ig_m: null,
    depth_m: r.depthM ?? null,
    flag: r.flag,
    reason: r.code,
  };
  return {
    record,
    flag: r.flag,
    depthM: r.code === 'REEFD_WAVES_DRY' ? null : (r.depthM ?? null),
    hm0SsM: null,
  };
}

/** Waves and mean depth of a burst, stamped at its centre (docs/methods/waves.md 4.1, 4.6). */
export function deriveWaves(ctx: DeriveContext, m: PressureMessage, heightM: number): WavesResult {
  const n = m.p_dbar.length;
  const tCentre = m.tMs + (n / (2 * m.fs_hz)) * 1000;
  const baro = baroAt(ctx, tCentre);
  const ctd = ctdAt(ctx, m.station, tCentre, true);
  // Without a CTD, seawater of S 35 at the logger's temperature (or 27 degC) stands in, flagged 3.
  const rho = ctd ? densityEos80(ctd.sal.value, ctd.temp.value) : densityEos80(35, m.temp_c ?? 27);
  // The samples as carried: the waves library reads a null as a gap itself (no per-sample copy here).
  const r = analyzeBurst({
    pDbar: m.p_dbar,
    fsHz: m.fs_hz,
    t0Ms: m.tMs,
    sensorHeightM: heightM,
    patmDbar: baro.hpa * 0.01,
    rhoKgM3: rho,
    gMS2: ctx.gMS2,
  });
  const base: WavesBase = {
    type: 'waves',
    site: ctx.config.site,
    t: new Date(tCentre).toISOString(),
    station: m.station,
    sensor: m.sensor,
  };
  if (!r.ok) return failedBurst(base, r);
  const flag = worst(r.flag, ctd ? 1 : 3, baro.flag);
  const record: WavesRecord = {
    ...base,
    hm0_m: r.hm0M,
    tp_s: r.tpS,
    tm01_s: r.tm01S,
    tm02_s: r.tm02S,
    hrms_m: r.hrmsM,
    hm0_ss_m: r.hm0SsM,
    hm0_ig_m: r.hm0IgM,
    depth_m: r.depthM,
    cutoff_hz: r.cutoffHz,
    dof: r.dof,
    hm0_sigma_m: r.hm0SigmaM,
    h13_m: r.h13M,
    hmax_m: r.hmaxM,
    tz_s: r.tzS,
    n_waves: r.nWaves,
    flag,
    baro_source: baro.source,
  };
  return { record, flag, depthM: r.depthM, hm0SsM: r.hm0SsM };
}
