// Per-reading derivations: one message in, at most one record out, with the station state it needs.
// Each function calls the science library of its kind; the processor owns the state and the ordering.
import type {
  AdcpMessage,
  CarbonateRecord,
  CurrentRecord,
  OxygenMessage,
  OxygenRecord,
  Pco2Message,
  PressureMessage,
  ReefdConfig,
  WavesRecord,
} from '../contract/index.js';
import { solveCarbonate, carbonateUncertainty, type CarbonateOptions } from '../carbonate/index.js';
import { processEnsemble } from '../currents/index.js';
import {
  densityEos80,
  gravity,
  o2MgLFromUmolKg,
  o2SatPct,
  o2UmolKgFromSatPct,
  o2UmolKgFromUmolL,
  o2UmolLFromMgL,
  recompensateO2Salinity,
} from '../seawater/index.js';
import { analyzeBurst } from '../waves/index.js';
import { interpolate, localMean, nearest, type Pick, type Series } from './series.js';
import type { ProcessorState, StationVar } from './state.js';

const MIN = 60_000;
const HOUR = 3_600_000;
/** Standard atmosphere, hPa. */
const STD_BARO_HPA = 1013.25;

export interface DeriveContext {
  /**
   * Derivations read only samples up to this time (the message's own `t`): what else happens to have been
   * derived already depends on delivery order, so looking past `t` would make records order-dependent.
   */
  asOfMs: number;
  config: ReefdConfig;
  state: ProcessorState;
  carbonateOptions: CarbonateOptions;
  gMS2: number;
}

export function makeContext(config: ReefdConfig, state: ProcessorState): DeriveContext {
  return {
    asOfMs: Infinity,
    config,
    state,
    carbonateOptions: {
      carbonicConstants: config.carbonate.carbonic_constants,
      boron: config.carbonate.boron,
    } satisfies CarbonateOptions,
    gMS2: gravity(config.latitude_deg),
  };
}

function series(ctx: DeriveContext, station: string, v: StationVar): Series {
  const st = ctx.state.stations[station];
  if (st === undefined)
    throw new Error(`processor: station ${station} has no state (config and state disagree)`);
  return st[v];
}

/** Temperature and salinity of the station's CTD at tMs (+-ctd_average_min mean, else nearest within the limit). */
export function ctdAt(
  ctx: DeriveContext,
  station: string,
  tMs: number,
): { temp: Pick; sal: Pick } | undefined {
  const p = ctx.config.processing;
  const temp = localMean(
    series(ctx, station, 'temp'),
    tMs,
    p.ctd_average_min * MIN,
    p.ctd_match_min * MIN,
    ctx.asOfMs,
  );
  const sal = localMean(
    series(ctx, station, 'sal'),
    tMs,
    p.ctd_average_min * MIN,
    p.ctd_match_min * MIN,
    ctx.asOfMs,
  );
  return temp && sal ? { temp, sal } : undefined;
}

/** Barometric pressure at tMs, hPa, interpolated; after a gap over baro_max_gap_h the standard value, flag 3. */
export function baroAt(
  ctx: DeriveContext,
  tMs: number,
): { hpa: number; flag: number; source: 'met' | 'default' } {
  const pick = interpolate(ctx.state.site.baro, tMs, ctx.config.processing.baro_max_gap_h * HOUR, ctx.asOfMs);
  if (pick) return { hpa: pick.value, flag: pick.flag, source: 'met' };
  return { hpa: ctx.config.processing.default_baro_hpa, flag: 3, source: 'default' };
}

const worst = (...f: number[]): number => f.reduce((a, b) => (b > a ? b : a), 1);

// ---------------------------------------------------------------------------------------------- oxygen

/**
 * O2 in umol/kg, % saturation and mg/L (docs/methods/seawater.md 2.3-2.4). A concentration from an optode set to another
 * salinity (`sal_setting`, message or sensor config) is re-compensated to the CTD salinity first.
 */
export function deriveOxygen(
  ctx: DeriveContext,
  m: OxygenMessage,
  salSetting: number | undefined,
): { record: OxygenRecord; o2UmolKg: number; flag: number } | { skip: string } {
  const ctd = ctdAt(ctx, m.station, m.tMs);
  if (!ctd) return { skip: 'no_ctd' };
  const S = ctd.sal.value;
  const t = m.temp_c;
  const baro = baroAt(ctx, m.tMs);
  let o2: number;
  let source: string;
  if (m.o2_umol_l !== undefined || m.o2_mg_l !== undefined) {
    const umolL = m.o2_umol_l ?? o2UmolLFromMgL(m.o2_mg_l as number);
    const set = m.sal_setting ?? salSetting;
    const recomp = set !== undefined ? recompensateO2Salinity(umolL, t, S, set) : umolL;
    o2 = o2UmolKgFromUmolL(recomp, S, t);
    source = m.o2_umol_l !== undefined ? 'umol_l' : 'mg_l';
  } else {
    // An instrument's % saturation refers to 1 atm unless its set-up says otherwise (docs/methods/seawater.md 2.3).
    o2 = o2UmolKgFromSatPct(m.o2_sat_pct as number, S, t, 1);
    source = 'sat_pct';
  }
  const satPct = o2SatPct(o2, S, t, baro.hpa / STD_BARO_HPA);
  const mgL = o2MgLFromUmolKg(o2, S, t);
  const flag = worst(ctd.sal.flag, ctd.temp.flag === 4 ? 3 : 1, baro.source === 'default' ? 2 : 1);
  const record: OxygenRecord = {
    type: 'oxygen',
    site: ctx.config.site,
    t: m.t,
    station: m.station,
    o2_umol_kg: o2,
    o2_sat_pct: satPct,
    o2_mg_l: mgL,
    sensor: m.sensor,
    flag,
    o2_source: source,
    sal_used: S,
  };
  return { record, o2UmolKg: o2, flag };
}

// ---------------------------------------------------------------------------------------------- carbonate

export type TaSource = 'salinity' | 'sample' | 'measured';

/** TA for a station at tMs: the latest bottle sample within the age limit (if configured), else TA(S). */
export function taFor(
  ctx: DeriveContext,
  station: string,
  tMs: number,
  salinity: number,
): { ta: number; source: TaSource } {
  const a = ctx.config.alkalinity;
  if (a.source === 'samples') {
    const s = series(ctx, station, 'sampleTa');
    const maxAge = ctx.config.processing.sample_max_age_h * HOUR;
    const pick = nearest(s, tMs, maxAge);
    if (pick && pick.tMs <= tMs) {
      const sSal = nearest(series(ctx, station, 'sampleSal'), pick.tMs, 0);
      // Carry the bottle TA to the present salinity (TA is conservative with S; Friis et al. 2003).
      const ta = sSal ? (pick.value * salinity) / sSal.value : pick.value;
      return { ta, source: 'sample' };
    }
  }
  return { ta: (a.ta_s35_umol_kg * salinity) / 35, source: 'salinity' };
}

/** The carbonate system at a pCO2 reading, reported at the CTD temperature (docs/methods/carbonate.md 3.6, 3.8). */
export function deriveCarbonate(
  ctx: DeriveContext,
  m: Pco2Message,
  warmPh: number | undefined,
):
  | { record: CarbonateRecord; flag: number; ph: number; ta: number; dic: number; pco2Out: number }
  | { skip: string } {
  const ctd = ctdAt(ctx, m.station, m.tMs);
  if (!ctd) return { skip: 'no_ctd' };
  const S = ctd.sal.value;
  const tOut = ctd.temp.value;
  const tIn = m.temp_c ?? tOut;
  const { ta, source } = taFor(ctx, m.station, m.tMs, S);
  const baro = baroAt(ctx, m.tMs);
  const input = {
    salinity: S,
    tempC: tIn,
    pco2Uatm: m.pco2_uatm,
    taUmolKg: ta,
    outTempC: tOut,
    baroHpa: baro.hpa,
    ...(warmPh !== undefined ? { initialPh: warmPh } : {}),
  };
  const r = solveCarbonate(input, ctx.carbonateOptions);
  if (!r.ok) return { skip: `carbonate:${r.code}` };
  const sig = carbonateUncertainty(
    input,
    {
      pco2Uatm: Math.max(2, 0.01 * m.pco2_uatm),
      taUmolKg: source === 'salinity' ? 10 : 3,
      tempC: 0.05,
      salinity: 0.05,
    },
    ctx.carbonateOptions,
  );
  const sg = (k: string): number | undefined => {
    const v = (sig as unknown as Record<string, unknown>)[k];
    return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
  };
  const flag = worst(r.flag, ctd.sal.flag, ctd.temp.flag, baro.source === 'default' ? 2 : 1);
  const record: CarbonateRecord = {
    type: 'carbonate',
    site: ctx.config.site,
    t: m.t,
    station: m.station,
    ta_umol_kg: r.taUmolKg,
    dic_umol_kg: r.dicUmolKg,
    ph_total: r.phTotal,
    pco2_uatm: r.pco2Uatm,
    co3_umol_kg: r.co3UmolKg,
    omega_ar: r.omegaAr,
    omega_ca: r.omegaCa,
    ta_source: source,
    hco3_umol_kg: r.hco3UmolKg,
    co2_umol_kg: r.co2UmolKg,
    revelle: r.revelle,
    temp_c: tOut,
    sal: S,
    sensor: m.sensor,
    flag,
    constants: `${ctx.config.carbonate.carbonic_constants}/${ctx.config.carbonate.boron}`,
  };
  for (const [k, name] of [
    ['phTotal', 'ph_total_sigma'],
    ['omegaAr', 'omega_ar_sigma'],
    ['dicUmolKg', 'dic_umol_kg_sigma'],
  ] as const) {
    const v = sg(k);
    if (v !== undefined) (record as Record<string, unknown>)[name] = v;
  }
  return { record, flag, ph: r.phTotal, ta: r.taUmolKg, dic: r.dicUmolKg, pco2Out: r.pco2Uatm };
}

// ---------------------------------------------------------------------------------------------- waves

export function deriveWaves(
  ctx: DeriveContext,
  m: PressureMessage,
  heightM: number,
): { record: WavesRecord; flag: number; depthM: number | null; hm0SsM: number | null } {
  const n = m.p_dbar.length;
  const tCentre = m.tMs + (n / (2 * m.fs_hz)) * 1000;
  const baro = baroAt(ctx, tCentre);
  const ctd = ctdAt(ctx, m.station, tCentre);
  // Without a CTD, seawater of S 35 at the logger's temperature (or 27 degC) stands in, flagged 3.
  const rho = ctd ? densityEos80(ctd.sal.value, ctd.temp.value) : densityEos80(35, m.temp_c ?? 27);
  const p = Float64Array.from(m.p_dbar, (x) => (x === null ? Number.NaN : x));
  const r = analyzeBurst({
    pDbar: p,
    fsHz: m.fs_hz,
    t0Ms: m.tMs,
    sensorHeightM: heightM,
    patmDbar: baro.hpa * 0.01,
    rhoKgM3: rho,
    gMS2: ctx.gMS2,
  });
  const base = {
    type: 'waves' as const,
    site: ctx.config.site,
    t: new Date(tCentre).toISOString(),
    station: m.station,
    sensor: m.sensor,
  };
  if (!r.ok) {
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

// ---------------------------------------------------------------------------------------------- currents

export interface AdcpSettings {
  height_m: number;
  beam_angle_deg: number;
  orientation: 'up' | 'down';
  declination_deg: number;
  heading_offset_deg: number;
  head: 'convex' | 'concave';
  first_bin_range_m?: number | undefined;
}

export function deriveCurrent(
  ctx: DeriveContext,
  m: AdcpMessage,
  s: AdcpSettings,
): { record: CurrentRecord; flag: number; eastMS: number | null; northMS: number | null } {
  // Depth from the station's pressure logger within the last hour, else the ADCP's own pressure (the lib).
  const depth = nearest(series(ctx, m.station, 'depthDone'), m.tMs, HOUR, ctx.asOfMs);
  const hm0 = nearest(series(ctx, m.station, 'hm0ssDone'), m.tMs, HOUR, ctx.asOfMs);
  const ctd = ctdAt(ctx, m.station, m.tMs);
  const baro = baroAt(ctx, m.tMs);
  const r = processEnsemble(
    {
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
    },
    {
      heightM: s.height_m,
      beamAngleDeg: s.beam_angle_deg,
      orientation: s.orientation,
      declinationDeg: s.declination_deg,
      headingOffsetDeg: s.heading_offset_deg,
      convex: s.head === 'convex',
      ...(s.first_bin_range_m !== undefined ? { firstBinRangeM: s.first_bin_range_m } : {}),
    },
    {
      reefAxisDeg: ctx.config.reef_axis_deg,
      patmDbar: baro.hpa * 0.01,
      gMS2: ctx.gMS2,
      ...(depth ? { depthM: depth.value } : {}),
      ...(hm0 ? { hm0SsM: hm0.value } : {}),
      ...(ctd ? { rhoKgM3: densityEos80(ctd.sal.value, ctd.temp.value) } : {}),
    },
  );
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
    return { record, flag: r.flag, eastMS: null, northMS: null };
  }
  const flag = worst(r.flag, depth ? depth.flag : 1);
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
  return { record, flag, eastMS: r.eastMS, northMS: r.northMS };
}
