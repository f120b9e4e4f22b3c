// The scripted sensor faults and events of a run, placed at fixed fractions of its length so that every
// run (a 6-h test or a 48-h demo) shows each of them: a pCO2 flat line, a stale CTD, spikes, a failing
// battery, and a low-oxygen night in the lagoon.
import type { Role } from './site.js';

export type FaultKind = 'flatline' | 'stale' | 'spike' | 'battery';

export interface ScriptedFault {
  fault: FaultKind;
  station: string;
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

/** Failing battery: falls linearly from 12.3 V to 10.6 V over the fault window. */
export function failingBatteryV(tMs: number, f: ScriptedFault, noise: number): number {
  const x = Math.min(1, Math.max(0, (tMs - f.startMs) / Math.max(1, f.endMs - f.startMs)));
  return 12.3 - 1.7 * x + 0.01 * noise;
}
