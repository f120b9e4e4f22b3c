// Oxygen optode: O2 in umol/kg, % saturation and mg/L at the station CTD's salinity (docs/methods/seawater.md
// 2.3-2.4), an `oxygen` record per reading, and the O2 series the flux windows' budget reads.
import type { OxygenMessage, OxygenRecord } from '../../contract/index.js';
import {
  o2MgLFromUmolKg,
  o2SatPct,
  o2UmolKgFromSatPct,
  o2UmolKgFromUmolL,
  o2UmolLFromMgL,
  recompensateO2Salinity,
} from '../../seawater/index.js';
import { baroAt, ctdAt, STD_BARO_HPA, worst, type DeriveContext } from '../derive.js';
import { atSampleTime, defineKind } from './types.js';

export const oxygen = defineKind({
  kind: 'oxygen',
  order: 6,
  qcVariables: ['o2_umol_kg'],
  writes: { station: ['o2'], site: [] },
  reads: { station: ['temp', 'sal'], site: ['baro'] },
  completeMs: atSampleTime,
  derive(m, io) {
    const r = deriveOxygen(io.ctx, m, io.sensorConfig?.sal_setting);
    if ('skip' in r) {
      io.alert('oxygen.missing', Number.NaN, 9);
      return;
    }
    const f = io.qc('oxygen.o2_umol_kg', 'o2_umol_kg', r.o2UmolKg, r.flag);
    r.record.flag = f;
    io.emit(r.record);
    io.observe(r.record, f);
    io.put('o2', m.tMs, r.o2UmolKg, f);
  },
});

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
