// Per-sensor bookkeeping (state.sensors, keyed `station/sensor`): duplicate detection by time and sequence
// number, last seen, battery and the worst flag of the last message, for the health table.
import type { ReefdConfig, SensorMessage } from '../contract/index.js';
import type { ProcessorState, SensorState } from './state.js';

/** How many recent sample times and sequence numbers a sensor remembers for duplicate detection. */
const RECENT_IDS = 64;

export interface SensorHealthRow {
  station: string;
  sensor: string;
  kind: string;
  lastSeenMs: number;
  batteryV: number | null;
  flag: number | null;
}

export const sensorKey = (m: { station: string; sensor: string }): string => `${m.station}/${m.sensor}`;

/** The sensor's bookkeeping, created on its first message. */
export function sensorStateOf(state: ProcessorState, m: SensorMessage): SensorState {
  const key = sensorKey(m);
  let s = state.sensors[key];
  if (s === undefined) {
    s = { lastTMs: 0, recentT: [], recentSeq: [], count: 0 };
    state.sensors[key] = s;
  }
  return s;
}

/** True for a message already seen (same time or same seq as a recent one); otherwise notes it. */
export function isDuplicate(state: ProcessorState, m: SensorMessage): boolean {
  const s = sensorStateOf(state, m);
  if (s.recentT.includes(m.tMs) || (m.seq !== undefined && s.recentSeq.includes(m.seq))) return true;
  s.recentT.push(m.tMs);
  if (s.recentT.length > RECENT_IDS) s.recentT.shift();
  if (m.seq !== undefined) {
    s.recentSeq.push(m.seq);
    if (s.recentSeq.length > RECENT_IDS) s.recentSeq.shift();
  }
  if (m.tMs > s.lastTMs) s.lastTMs = m.tMs;
  s.count++;
  return false;
}

/** Last seen, battery and last flag of every sensor that has reported. */
export function sensorHealth(config: ReefdConfig, state: ProcessorState): SensorHealthRow[] {
  return Object.entries(state.sensors).map(([key, s]) => {
    const [station = '', sensor = ''] = key.split('/');
    return {
      station,
      sensor,
      // A sensor that has since left the configuration keeps its row until the state forgets it.
      kind: config.stations[station]?.sensors[sensor]?.kind ?? 'unknown',
      lastSeenMs: s.lastTMs,
      batteryV: s.batteryV ?? null,
      flag: s.lastFlag ?? null,
    };
  });
}
