// ADCP: the depth-averaged current of each ensemble (docs/methods/currents.md 5.5-5.6), with the depth from the
// ADCP's own pressure, else from the station's pressure logger (adcp-depth.ts), a `current` record per ensemble,
// and the east and north series of the flux windows.
import type { AdcpMessage, CurrentRecord } from '../../contract/index.js';
import { processEnsemble, type AdcpEnsemble, type AdcpSensorConfig } from '../../currents/index.js';
import { densityEos80 } from '../../seawater/index.js';
import { baroAt, ctdAt, series, use, worst, type DeriveContext } from '../derive.js';
import { nearest } from '../series.js';
import { depthDifferenceM, loggerDepthAt } from './adcp-depth.js';
import { atSampleTime, defineKind, type SensorConfigOf } from './types.js';

const HOUR = 3_600_000;
/** Logger and ADCP depths differing by more than this give 3 (docs/methods/qc.md 7.2 test 9), m. */
const DEPTH_MISMATCH_M = 0.05;

export const adcp = defineKind({
  kind: 'adcp',
  order: 4,
  qcVariables: [],
  writes: { station: ['east', 'north', 'adcpDepth'], site: [] },
  reads: { station: ['depthDone', 'burstCentre', 'adcpDepth', 'hm0ssDone', 'temp', 'sal'], site: ['baro'] },
  completeMs: atSampleTime,
  derive(m, io) {
    if (io.sensorConfig === undefined) return;
    const r = deriveCurrent(io.ctx, m, io.sensorConfig);
    io.emit(r.record);
    const tilt = r.record.reason === 'tilt' ? 4 : 1;
    const speed = r.record.speed_m_s;
    io.alert('current.speed_m_s', speed === null ? Number.NaN : speed, Math.max(r.flag, tilt));
    if (r.ownDepthM !== null) io.put('adcpDepth', m.tMs, r.ownDepthM, r.flag);
    if (r.eastMS !== null && r.northMS !== null) {
      io.put('east', m.tMs, r.eastMS, r.flag);
      io.put('north', m.tMs, r.northMS, r.flag);
    }
  },
});

/** The message as the currents library's ensemble (optional fields only when present). */
function ensembleOf(m: AdcpMessage): AdcpEnsemble {
  return {
    coord: m.coord,
    blankM: m.blank_m,
    binM: m.bin_m,
    velMS: m.vel_m_s,
    ...(m.heading_deg !== undefined ? { headingDeg: m.heading_deg } : {}),
    ...(m.pitch_deg !== undefined ? { pitchDeg: m.pitch_deg } : {}),
    ...(m.roll_deg !== undefined ? { rollDeg: m.roll_deg } : {}),
    ...(m.corr_pct !== undefined ? { corrPct: m.corr_pct } : {}),
    ...(m.echo !== undefined ? { echo: m.echo } : {}),
    ...(m.pres_dbar !== undefined ? { presDbar: m.pres_dbar } : {}),
    ...(m.temp_c !== undefined ? { tempC: m.temp_c } : {}),
  };
}

/** The sensor's configuration as the currents library's. */
function headOf(s: SensorConfigOf<'adcp'>): AdcpSensorConfig {
  return {
    heightM: s.height_m,
    beamAngleDeg: s.beam_angle_deg,
    orientation: s.orientation,
    declinationDeg: s.declination_deg,
    headingOffsetDeg: s.heading_offset_deg,
    convex: s.head === 'convex',
    ...(s.first_bin_range_m !== undefined ? { firstBinRangeM: s.first_bin_range_m } : {}),
  };
}

/** Sea-swell Hm0 of the last finished burst within the hour, for the side-lobe limit (optional: none is fine). */
function waveHeightAt(ctx: DeriveContext, station: string, tMs: number) {
  const ref = { station, v: 'hm0ssDone' } as const;
  if (!ctx.inputs.healthy(ref, tMs)) return undefined;
  const hm0 = nearest(series(ctx, station, 'hm0ssDone'), tMs, HOUR, ctx.asOfMs);
  if (hm0) use(ctx, ref);
  return hm0;
}

export function deriveCurrent(
  ctx: DeriveContext,
  m: AdcpMessage,
  s: SensorConfigOf<'adcp'>,
): {
  record: CurrentRecord;
  flag: number;
  eastMS: number | null;
  northMS: number | null;
  ownDepthM: number | null;
} {
  // The ADCP's own pressure gives the depth at the ensemble's time (the library uses it when no station depth
  // is passed); only without it does the logger's depth stand in.
  const ownPressure = m.pres_dbar !== undefined && Number.isFinite(m.pres_dbar);
  const depth = ownPressure ? undefined : loggerDepthAt(ctx, m.station, m.tMs);
  const hm0 = waveHeightAt(ctx, m.station, m.tMs);
  const ctd = ctdAt(ctx, m.station, m.tMs, true);
  const baro = baroAt(ctx, m.tMs);
  const r = processEnsemble(ensembleOf(m), headOf(s), {
    reefAxisDeg: ctx.config.reef_axis_deg,
    patmDbar: baro.hpa * 0.01,
    gMS2: ctx.gMS2,
    ...(depth ? { depthM: depth.depthM } : {}),
    ...(hm0 ? { hm0SsM: hm0.value } : {}),
    ...(ctd ? { rhoKgM3: densityEos80(ctd.sal.value, ctd.temp.value) } : {}),
  });
  const base = {
    type: 'current' as const,
    site: ctx.config.site,
    t: m.t,
    station: m.station,
    sensor: m.sensor,
  };
  if (!r.ok) {
    const record: CurrentRecord = {
      ...base,
      east_m_s: null,
      north_m_s: null,
      u_m_s: null,
      v_m_s: null,
      speed_m_s: null,
      dir_to_deg: null,
      bins_used: 0,
      flag: r.flag,
      reason: r.reason,
    };
    return { record, flag: r.flag, eastMS: null, northMS: null, ownDepthM: null };
  }
  const diffM = ownPressure ? depthDifferenceM(ctx, m.station, m.tMs) : undefined;
  const mismatch = diffM !== undefined && Math.abs(diffM) > DEPTH_MISMATCH_M;
  const flag = worst(r.flag, depth ? depth.flag : 1, mismatch ? 3 : 1);
  const record: CurrentRecord = {
    ...base,
    east_m_s: r.eastMS,
    north_m_s: r.northMS,
    u_m_s: r.uMS,
    v_m_s: r.vMS,
    speed_m_s: r.speedMS,
    dir_to_deg: r.dirToDeg,
    bins_used: r.binsUsed,
    depth_m: r.depthM,
    depth_source: r.depthSource,
    tau_bed_pa: r.tauBedPa,
    speed_sigma_m_s: r.sigmaMS,
    flag,
  };
  if (diffM !== undefined) record.depth_diff_m = diffM;
  const ownDepthM = r.depthSource === 'adcp' ? r.depthM : null;
  return { record, flag, eastMS: r.eastMS, northMS: r.northMS, ownDepthM };
}
