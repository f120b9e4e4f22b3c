// Operational alerts: what the daemon itself has to tell the people on watch (an output's spool near its
// bound, a full disk, credentials refused, a logger that rebooted). They are alert records on the record
// bus, so the dashboard shows them and the notifier delivers them like any alert; they are stamped with the
// wall clock, derive from no message, and so never go to the record outputs (a replay of the archive
// could not give them again).
import type { DerivedRecord } from '../../libs/contract/index.js';

export type OperationalRule =
  'spool_near_limit' | 'disk_full' | 'output_auth' | 'sensor_reboot' | 'site_silent';

export interface OperationalAlertInput {
  site: string;
  rule: OperationalRule;
  state?: 'raised' | 'cleared';
  value: number | null;
  limit: number | null;
  station?: string;
  sensor?: string;
  severity?: 'info' | 'warning' | 'critical';
  nowMs: number;
  /** For a clear: when its episode was raised (the episode id comes from it, so the clear closes it). */
  raisedAtMs?: number;
}

const SEVERITY: Record<OperationalRule, 'info' | 'warning' | 'critical'> = {
  spool_near_limit: 'critical',
  disk_full: 'critical',
  output_auth: 'critical',
  sensor_reboot: 'warning',
  site_silent: 'critical',
};

export function operationalAlert(a: OperationalAlertInput): DerivedRecord {
  const state = a.state ?? 'raised';
  const where = a.sensor ?? a.station ?? a.site;
  return {
    type: 'alert',
    site: a.site,
    t: new Date(a.nowMs).toISOString(),
    rule: `reefd.${a.rule}`,
    class: 'fault',
    state,
    value: a.value,
    limit: a.limit,
    ...(a.station !== undefined ? { station: a.station } : {}),
    ...(a.sensor !== undefined ? { sensor: a.sensor } : {}),
    severity: a.severity ?? SEVERITY[a.rule],
    id: `reefd.${a.rule}.${where}.${a.raisedAtMs ?? a.nowMs}`,
  } as DerivedRecord;
}
