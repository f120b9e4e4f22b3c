// `/api/site`: names, positions, sensors, the alert rules in force with their limits and units, and the
// units and labels of every record field. The page never repeats a threshold or a unit: it reads them here.
import { alertsConfigSchema, resolveRules } from '../../libs/alerts/index.js';
import { RECORD_TYPE_SPECS, type ReefdConfig } from '../../libs/contract/index.js';
import type { SiteInfo } from './api-schemas.js';
import { metricInfo } from './units.js';

const MIN_MS = 60_000;

/**
 * Fields the records carry besides the table's (extension fields of the processor) that the dashboard plots:
 * the CTD temperature and salinity the carbonate system was solved at, and the rest of the day's fitted light
 * responses (libs/daily record.ts), with words where the name alone says too little.
 */
const EXTRA_FIELDS: Readonly<Record<string, readonly (string | readonly [string, string])[]>> = {
  carbonate: ['temp_c', 'sal', 'ph_total_sigma', 'omega_ar_sigma'],
  oxygen: ['sal_used'],
  flux: ['storage_fraction'],
  daily: [
    ['r_fit_mmol_m2_h', 'community respiration of the fitted production-light curve'],
    ['r_mmol_m2_h', 'community respiration per hour'],
    ['gmax_mmol_m2_h', 'maximum light-driven calcification of the fitted curve'],
    ['ik_nec_umol_m2_s', 'light saturation parameter of the calcification curve'],
    ['g0_mmol_m2_h', 'calcification in the dark of the fitted curve'],
  ],
};

function recordTypes(): SiteInfo['record_types'] {
  const out: SiteInfo['record_types'] = {};
  for (const [type, spec] of Object.entries(RECORD_TYPE_SPECS)) {
    const fields: SiteInfo['record_types'][string]['fields'] = {};
    for (const [name, f] of Object.entries(
      spec.fields as Record<string, { unit: string; label: string; kind: 'number' | 'string' | 'boolean' }>,
    ))
      fields[name] = { unit: f.unit, label: f.label, kind: f.kind };
    for (const extra of EXTRA_FIELDS[type] ?? []) {
      const [name, label] = typeof extra === 'string' ? [extra, undefined] : extra;
      if (fields[name]) continue;
      const m = metricInfo(`${type}.${name}`);
      fields[name] = { unit: m.unit, label: label ?? m.label, kind: 'number' };
    }
    out[type] = { subject: spec.subject, label: spec.label, fields };
  }
  return out;
}

export function siteInfo(config: ReefdConfig, history: { windowMs: number; resolutionMs: number }): SiteInfo {
  const alerts = config.alerts ?? alertsConfigSchema.parse({});
  const resolved = resolveRules(alerts);
  return {
    site: config.site,
    timezone: config.timezone,
    latitude_deg: config.latitude_deg ?? null,
    reef_axis_deg: config.reef_axis_deg,
    stations: Object.entries(config.stations).map(([id, s]) => ({
      id,
      label: s.label ?? id,
      position: s.position ?? null,
      sensors: Object.entries(s.sensors).map(([sid, sc]) => ({
        id: sid,
        kind: sc.kind,
        label: sc.label ?? sid,
        enabled: sc.enabled,
        interval_s: sc.interval_s ?? null,
      })),
    })),
    transects: Object.entries(config.transects).map(([id, t]) => ({
      id,
      label: t.label ?? id,
      upstream: t.upstream,
      downstream: t.downstream,
      current: t.current,
      length_m: t.length_m,
    })),
    rules: resolved.thresholds.map((r) => {
      const m = metricInfo(r.metric);
      return {
        id: r.id,
        metric: r.metric,
        class: r.class,
        fault: r.fault ?? null,
        dir: r.dir,
        limit: r.limit,
        clear: r.clear,
        unit: m.unit,
        label: m.label,
        raise_after_min: r.raiseAfterMs / MIN_MS,
        severity: r.severity,
        stations: r.stations ? [...r.stations] : null,
        sensors: r.sensors ? [...r.sensors] : null,
      };
    }),
    faults: {
      stale_factor: resolved.faults.stale.factor,
      stale_min_min: resolved.faults.stale.minMs / MIN_MS,
      silence_min: alerts.silence_min,
    },
    processing: { window_min: config.processing.window_min, cadence_min: config.processing.cadence_min },
    history: { window_h: history.windowMs / 3_600_000, resolution_min: history.resolutionMs / MIN_MS },
    record_types: recordTypes(),
  };
}
