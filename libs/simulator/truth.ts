// The truth beside the messages: what the reef model actually held, per station and per transect, so tests
// can score the daemon's derived records. Field names follow the derived records (contract section 4).
import type { TransectConfig } from '../contract/index.js';
import { density, o2MgL, speciate } from './chemistry.js';
import type { DailyTruth } from './daily-truth.js';
import type { ScriptedFault } from './faults.js';
import type { ReefSnapshot } from './model.js';
import type { Role, SiteLayout } from './site.js';

export interface StationTruth {
  kind: 'station';
  t: string;
  station: string;
  role: Role;
  depth_m: number;
  hm0_m: number;
  hm0_ss_m: number;
  hm0_ig_m: number;
  hrms_m: number;
  tp_s: number;
  east_m_s: number;
  north_m_s: number;
  speed_m_s: number;
  temp_c: number;
  sal: number;
  o2_umol_kg: number;
  o2_mg_l: number;
  pco2_uatm: number;
  ph_total: number;
  ta_umol_kg: number;
  dic_umol_kg: number;
  omega_ar: number;
}

export interface TransectTruth {
  kind: 'transect';
  t: string;
  transect: string;
  ncp_mmol_m2_h: number;
  nec_mmol_m2_h: number;
  u_m_s: number;
  depth_m: number;
  residence_min: number;
}

export type FaultTruth = { kind: 'fault'; t: string } & ScriptedFault;
export interface EventTruth {
  kind: 'event';
  t: string;
  event: 'lagoon_low_oxygen';
  centreMs: number;
}

export type TruthRow = StationTruth | TransectTruth | FaultTruth | EventTruth | DailyTruth;
export type { DailyTruth };

const r = (x: number, dp: number) => Math.round(x * 10 ** dp) / 10 ** dp;

export function stationTruth(
  snap: ReefSnapshot,
  station: string,
  role: Role,
  _axisDeg: number,
): StationTruth {
  const s = snap.roles[role];
  const w = s.water;
  const c = speciate(w);
  const hm0Ss = s.hrmsSsM * Math.SQRT2;
  const hm0 = Math.hypot(hm0Ss, s.hm0IgM);
  return {
    kind: 'station',
    t: new Date(snap.tMs).toISOString(),
    station,
    role,
    depth_m: r(s.depthM, 4),
    hm0_m: r(hm0, 4),
    hm0_ss_m: r(hm0Ss, 4),
    hm0_ig_m: r(s.hm0IgM, 4),
    // Spectral Hrms = sqrt(8 m0) = Hm0/sqrt(2), as the daemon defines it (science 4.4).
    hrms_m: r(hm0 / Math.SQRT2, 4),
    tp_s: r(s.tpS, 3),
    east_m_s: r(s.eastMS, 4),
    north_m_s: r(s.northMS, 4),
    speed_m_s: r(Math.hypot(s.eastMS, s.northMS), 4),
    temp_c: r(w.tempC, 4),
    sal: r(w.sal, 4),
    o2_umol_kg: r(w.o2UmolKg, 2),
    o2_mg_l: r(o2MgL(w.o2UmolKg, density(w)), 3),
    pco2_uatm: r(c.pco2Uatm, 2),
    ph_total: r(c.phTotal, 4),
    ta_umol_kg: r(w.taUmolKg, 2),
    dic_umol_kg: r(w.dicUmolKg, 2),
    omega_ar: r(c.omegaAr, 3),
  };
}

export function transectTruth(
  snap: ReefSnapshot,
  id: string,
  tr: TransectConfig,
  layout: SiteLayout,
): TransectTruth {
  const up = layout.roleOf.get(tr.upstream) ?? 'flat';
  const down = layout.roleOf.get(tr.downstream) ?? 'flat';
  const cur = snap.roles[layout.roleOf.get(tr.current) ?? 'flat'];
  const rates = up === 'flat' && down === 'back' ? snap.inner : snap.outer;
  const bearing = ((tr.bearing_deg ?? layout.reefAxisDeg) * Math.PI) / 180;
  const u = cur.eastMS * Math.sin(bearing) + cur.northMS * Math.cos(bearing);
  const depth = 0.5 * (snap.roles[up].depthM + snap.roles[down].depthM);
  return {
    kind: 'transect',
    t: new Date(snap.tMs).toISOString(),
    transect: id,
    ncp_mmol_m2_h: r(rates.ncpMmolM2H, 3),
    nec_mmol_m2_h: r(rates.necMmolM2H, 3),
    u_m_s: r(u, 4),
    depth_m: r(depth, 4),
    residence_min: r(u > 0 ? tr.length_m / u / 60 : 0, 2),
  };
}
