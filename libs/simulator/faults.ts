// The scripted sensor faults and events of a run, placed at fixed fractions of its length so that every
// run (a 6-h test or a 48-h demo) shows each of them: a silent uplink, a dead (stale) CTD, spikes, a frozen
// (flat-lined) pCO2, a failing battery, and a low-oxygen night in the lagoon.
import type { Role } from './site.js';

export type FaultKind = 'flatline' | 'stale' | 'spike' | 'battery' | 'silent';

/** Station and sensor of a fault that concerns the whole site (the uplink). */
export const WHOLE_SITE = '*';

export interface ScriptedFault {
  fault: FaultKind;
  /** Station id, or WHOLE_SITE. */
  station: string;
  /** Sensor id, or WHOLE_SITE. */
  sensor: string;
  startMs: number;
  endMs: number;
  /** spike: the offset added to the one affected sample (the field's units). */
  spikeOffset?: number;
}

export interface SensorRef {
  station: string;
  sensor: string;
  kind: string;
  role: Role;
}

export function planFaults(
  sensors: readonly SensorRef[],
  startMs: number,
  durationMs: number,
): ScriptedFault[] {
  const at = (f: number) => startMs + Math.round(f * durationMs);
  const pick = (kind: string, ...roles: Role[]) => {
    for (const role of roles) {
      const s = sensors.find((x) => x.kind === kind && x.role === role);
      if (s) return s;
    }
    return sensors.find((x) => x.kind === kind);
  };
  const out: ScriptedFault[] = [];
  // The site's uplink goes down for 40 min (store and forward: the loggers keep their samples and send the
  // backlog when the link returns, so event time has no gap; only the wall clock sees the silence).
  const silentMs = Math.min(SILENT_UPLINK_MS, Math.round(0.08 * durationMs));
  if (sensors.length > 0) {
    out.push({
      fault: 'silent',
      station: WHOLE_SITE,
      sensor: WHOLE_SITE,
      startMs: at(0.1),
      endMs: at(0.1) + silentMs,
    });
  }
  const add = (s: SensorRef | undefined, f: Omit<ScriptedFault, 'station' | 'sensor'>) => {
    if (s) out.push({ station: s.station, sensor: s.sensor, ...f });
  };
  add(pick('pco2', 'back'), { fault: 'flatline', startMs: at(0.4), endMs: at(0.56) });
  add(pick('ctd', 'lagoon'), { fault: 'stale', startMs: at(0.2), endMs: at(0.25) });
  add(pick('oxygen', 'crest'), { fault: 'spike', startMs: at(0.3), endMs: at(0.3) + 1, spikeOffset: 90 });
  add(pick('ctd', 'flat'), { fault: 'spike', startMs: at(0.62), endMs: at(0.62) + 1, spikeOffset: 2.5 });
  add(pick('pco2', 'flat'), { fault: 'battery', startMs: at(0.65), endMs: startMs + durationMs });
  return out;
}

/** Supply voltage of a healthy logger: 12.6 V, charging by day (solar panel), plus noise. */
export function healthyBatteryV(parUmolM2S: number, noise: number): number {
  return 12.55 + 0.35 * Math.min(1, parUmolM2S / 1500) + 0.01 * noise;
}

/** Length of the silent uplink, ms (shorter runs: 8 % of the run). */
export const SILENT_UPLINK_MS = 40 * 60_000;

/**
 * Failing battery (the charger has failed): from the healthy night level, 12.6 V, down to 10.6 V linearly over the
 * fault window, with no daytime charging.
 */
export function failingBatteryV(tMs: number, f: ScriptedFault, noise: number): number {
  const x = Math.min(1, Math.max(0, (tMs - f.startMs) / Math.max(1, f.endMs - f.startMs)));
  return 12.6 - 2.0 * x + 0.01 * noise;
}
