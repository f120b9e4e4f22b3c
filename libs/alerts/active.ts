// The episodes an engine holds raised, as their raise records (for the dashboard and `reefd alerts list`).

import type { EngineSnapshot } from './engine.js';
import { SEP as sep, type AlertMaker } from './record.js';
import type { ResolvedRules } from './rules.js';
import type { AlertRecord } from './types.js';

export function activeAlerts(st: EngineSnapshot, rules: ResolvedRules, base: AlertMaker): AlertRecord[] {
  const out: AlertRecord[] = [];
  for (const [key, s] of Object.entries(st.thresholds)) {
    if (s.raisedAtMs === null || (s.phase !== 'raised' && s.phase !== 'pending_clear')) continue;
    const [rid, metric, station = '', sensor] = key.split(sep);
    const r = rules.thresholds.find((x) => x.id === rid && x.metric === metric);
    if (r === undefined) continue;
    out.push(
      base(r.id, r.class, 'raised', station, s.raisedAtMs, key, s.raisedAtMs, null, r.limit, r.severity, {
        metric,
        fault: r.fault,
        sensor: sensor || undefined,
      }),
    );
  }
  for (const [key, tr] of Object.entries(st.sensors)) {
    if (tr.stale === null) continue;
    const [station = '', sensor] = key.split(sep);
    const lim = (tr.staleLimitMs ?? 0) / 1000;
    out.push(
      base(
        'stale',
        'fault',
        'raised',
        station,
        tr.stale.raisedAtMs,
        `stale${sep}${key}`,
        tr.stale.raisedAtMs,
        lim,
        lim,
        rules.faults.stale.severity,
        { fault: 'stale', sensor },
      ),
    );
  }
  const bt = rules.batteryTrend;
  for (const [key, b] of Object.entries(st.battery ?? {})) {
    if (b.raisedAtMs === null) continue;
    const [, station = '', sensor] = key.split(sep);
    out.push(
      base(
        'battery_trend',
        'fault',
        'raised',
        station,
        b.raisedAtMs,
        key,
        b.raisedAtMs,
        null,
        bt.warnHours,
        bt.severity,
        {
          fault: 'battery',
          sensor: sensor || undefined,
        },
      ),
    );
  }
  for (const [key, m] of Object.entries(st.metrics)) {
    const [metric, station = '', sensor] = key.split(sep);
    for (const fault of ['range', 'flatline', 'spike'] as const) {
      const a = m[fault];
      if (a === null) continue;
      out.push(
        base(
          fault,
          'fault',
          'raised',
          station,
          a.raisedAtMs,
          `${fault}${sep}${key}`,
          a.raisedAtMs,
          null,
          null,
          rules.faults[fault].severity,
          { metric, fault, sensor: sensor || undefined },
        ),
      );
    }
  }
  return out.sort((a, b) => (a.t < b.t ? -1 : a.t > b.t ? 1 : a.id < b.id ? -1 : 1));
}
