// Derived records made straight from the simulator's truth, in the record shapes of contract section 4, for
// previewing and testing the dashboard without the daemon. The values are the model's own (no processing),
// the alerts those the scripted faults and the lagoon's low-oxygen night must raise.
import type { AlertRecord, DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import type { SimMessage, StationTruth, TransectTruth, TruthRow } from '../../libs/simulator/index.js';
import type { SensorHealth } from './server.js';

const iso = (ms: number) => new Date(ms).toISOString();

function kindsAt(config: ReefdConfig, station: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const [id, s] of Object.entries(config.stations[station]?.sensors ?? {}))
    if (!out.has(s.kind)) out.set(s.kind, id);
  return out;
}

export function recordsFromTruth(config: ReefdConfig, truth: readonly TruthRow[]): DerivedRecord[] {
  const site = config.site;
  const out: DerivedRecord[] = [];
  const alerts: AlertRecord[] = [];
  const lowSince = new Map<string, number>();
  const lowRaised = new Set<string>();
  for (const row of truth) {
    if (row.kind === 'station') {
      const r = row as StationTruth;
      const kinds = kindsAt(config, r.station);
      const base = { site, t: r.t, station: r.station };
      if (kinds.has('pressure')) {
        out.push({
          type: 'waves',
          ...base,
          hm0_m: r.hm0_m,
          tp_s: r.tp_s,
          tm01_s: 0.85 * r.tp_s,
          tm02_s: 0.78 * r.tp_s,
          hrms_m: r.hrms_m,
          hm0_ss_m: r.hm0_ss_m,
          hm0_ig_m: r.hm0_ig_m,
          depth_m: r.depth_m,
          sensor: kinds.get('pressure') as string,
          flag: 1,
        });
      }
      if (kinds.has('adcp')) {
        const sp = r.speed_m_s;
        const dir = ((Math.atan2(r.east_m_s, r.north_m_s) * 180) / Math.PI + 360) % 360;
        const ax = (config.reef_axis_deg * Math.PI) / 180;
        out.push({
          type: 'current',
          ...base,
          east_m_s: r.east_m_s,
          north_m_s: r.north_m_s,
          u_m_s: r.east_m_s * Math.sin(ax) + r.north_m_s * Math.cos(ax),
          v_m_s: -r.east_m_s * Math.cos(ax) + r.north_m_s * Math.sin(ax),
          speed_m_s: sp,
          dir_to_deg: dir,
          bins_used: 6,
          sensor: kinds.get('adcp') as string,
          flag: 1,
        });
      }
      if (kinds.has('oxygen')) {
        out.push({
          type: 'oxygen',
          ...base,
          o2_umol_kg: r.o2_umol_kg,
          o2_sat_pct: null,
          o2_mg_l: r.o2_mg_l,
          flag: 1,
        });
        // Built-in low-oxygen rule: below 2.0 mg/L for 10 min raises, above 2.5 clears (contract section 4).
        const key = r.station;
        const tMs = Date.parse(r.t);
        if (r.o2_mg_l < 2) {
          if (!lowSince.has(key)) lowSince.set(key, tMs);
          if (!lowRaised.has(key) && tMs - (lowSince.get(key) as number) >= 10 * 60_000) {
            lowRaised.add(key);
            alerts.push({
              type: 'alert',
              site,
              t: r.t,
              station: key,
              rule: 'low_oxygen',
              class: 'threshold',
              state: 'raised',
              value: r.o2_mg_l,
              limit: 2,
              metric: 'oxygen.o2_mg_l',
              sensor: kinds.get('oxygen') as string,
              id: `low_oxygen-${key}-${tMs}`,
              severity: 'critical',
            });
          }
        } else if (r.o2_mg_l > 2.5) {
          lowSince.delete(key);
          if (lowRaised.has(key)) {
            lowRaised.delete(key);
            const raised = [...alerts].reverse().find((a) => a.rule === 'low_oxygen' && a.station === key);
            if (raised)
              alerts.push({ ...raised, t: r.t, state: 'cleared', value: r.o2_mg_l, raised_t: raised.t });
          }
        }
      }
      if (kinds.has('pco2')) {
        out.push({
          type: 'carbonate',
          ...base,
          ta_umol_kg: r.ta_umol_kg,
          dic_umol_kg: r.dic_umol_kg,
          ph_total: r.ph_total,
          pco2_uatm: r.pco2_uatm,
          co3_umol_kg: null,
          omega_ar: r.omega_ar,
          omega_ca: null,
          ta_source: 'salinity',
          temp_c: r.temp_c,
          sal: r.sal,
          flag: 1,
        });
      }
    } else if (row.kind === 'transect') {
      const r = row as TransectTruth;
      const valid = r.u_m_s >= 0.02 && r.residence_min <= 240;
      out.push({
        type: 'flux',
        site,
        t: r.t,
        transect: r.transect,
        ncp_mmol_m2_h: r.ncp_mmol_m2_h,
        nec_mmol_m2_h: r.nec_mmol_m2_h,
        nec_method: 'inverse',
        u_m_s: r.u_m_s,
        depth_m: r.depth_m,
        residence_min: r.residence_min,
        valid,
        // The truth has no noise: any non-zero value is a real signal.
        ncp_significant: r.ncp_mmol_m2_h !== 0,
        nec_significant: r.nec_mmol_m2_h !== 0,
        ncp_sigma_mmol_m2_h: 3 + 0.1 * Math.abs(r.ncp_mmol_m2_h),
        nec_sigma_mmol_m2_h: 2 + 0.15 * Math.abs(r.nec_mmol_m2_h),
      });
    } else if (row.kind === 'fault' && row.fault !== 'silent') {
      // The fault rules raise a while after the fault starts (stale: 3 intervals; flat line: its window).
      const delayMs =
        row.fault === 'flatline'
          ? 3 * 3.6e6
          : row.fault === 'stale'
            ? 15 * 60_000
            : row.fault === 'battery'
              ? 0.5 * (row.endMs - row.startMs)
              : 10 * 60_000;
      const at = row.startMs + delayMs;
      const id = `${row.fault}-${row.sensor}-${row.startMs}`;
      const rec: AlertRecord = {
        type: 'alert',
        site,
        t: iso(at),
        station: row.station,
        rule: row.fault,
        class: 'fault',
        state: 'raised',
        value: row.fault === 'battery' ? 11.45 : null,
        limit: row.fault === 'battery' ? 11.5 : null,
        fault: row.fault,
        sensor: row.sensor,
        id,
        severity: 'warning',
      };
      alerts.push(rec);
      if (row.fault !== 'battery' && row.endMs > at)
        alerts.push({ ...rec, t: iso(row.endMs + 10 * 60_000), state: 'cleared', raised_t: rec.t });
    }
  }
  return [...out, ...alerts].sort((a, b) => Date.parse(a.t) - Date.parse(b.t));
}

/** Last seen and supply voltage of each sensor from the messages up to `untilMs`. */
export function healthFromMessages(messages: readonly SimMessage[], untilMs: number): SensorHealth[] {
  const by = new Map<string, SensorHealth>();
  for (const m of messages) {
    if (m.tMs > untilMs) break;
    const [, , station, kind, sensor] = m.topic.split('/');
    if (!station || !sensor) continue;
    by.set(`${station}/${sensor}`, {
      station,
      sensor,
      ...(kind ? { kind } : {}),
      last_seen: m.payload.t as string,
      battery_v: typeof m.payload.battery_v === 'number' ? m.payload.battery_v : null,
      qc_flag: 1,
    });
  }
  return [...by.values()];
}
