// One alert record from an episode's parts (docs/contract-v1.md section 4 `alert`, plus our id, severity and raised_t).

import { alertId } from './id.js';
import type { AlertRecord, FaultName } from './types.js';

/** Keys join ids that match [A-Za-z0-9_.-]; the unit separator cannot occur in them. */
export const SEP = '\u001f';

const iso = (ms: number): string => new Date(ms).toISOString();

export type AlertMaker = (
  rule: string,
  cls: AlertRecord['class'],
  state: AlertRecord['state'],
  station: string,
  tMs: number,
  key: string,
  raisedAtMs: number,
  value: number | null,
  limit: number | null,
  severity: AlertRecord['severity'],
  extra: { metric?: string | undefined; fault?: FaultName | undefined; sensor?: string | undefined },
) => AlertRecord;

/** The record of one transition; the id hashes the site, the episode key and its raise time. */
export function makeAlert(
  site: string,
  rule: string,
  cls: AlertRecord['class'],
  state: AlertRecord['state'],
  station: string,
  tMs: number,
  key: string,
  raisedAtMs: number,
  value: number | null,
  limit: number | null,
  severity: AlertRecord['severity'],
  extra: { metric?: string | undefined; fault?: FaultName | undefined; sensor?: string | undefined },
): AlertRecord {
  const rec: AlertRecord = {
    type: 'alert',
    site,
    t: iso(tMs),
    station,
    rule,
    class: cls,
    state,
    value: value !== null && Number.isFinite(value) ? value : null,
    limit: limit !== null && Number.isFinite(limit) ? limit : null,
    id: alertId(`${site}${SEP}${key}`, raisedAtMs),
    severity,
  };
  if (extra.metric !== undefined) rec.metric = extra.metric;
  if (extra.fault !== undefined) rec.fault = extra.fault;
  if (extra.sensor !== undefined) rec.sensor = extra.sensor;
  if (state === 'cleared') rec.raised_t = iso(raisedAtMs);
  return rec;
}
