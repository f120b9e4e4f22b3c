// Per-sensor bookkeeping (state.sensors, keyed `station/sensor`): duplicate detection by time and sequence
// number, logger reboots (a seq that starts again), last seen, battery and the worst flag of the last message, for the health table.
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

/** A counter that passed the top of 16 or 32 bits and started at 0 again. */
function wrapped(lastSeq: number, seq: number): boolean {
  return seq < 16 && [0xffff, 0xffffffff].some((top) => lastSeq <= top && lastSeq > top - 16);
}

/**
 * Intake bookkeeping per sensor: a message with the time, or the `seq`, of a recent one is a repeat. A
 * `seq` below the sensor's last on a newer sample is a logger that restarted its counter (a reboot): the
 * message is new data, kept and counted, and the remembered numbers start again. A wrap of a 16- or
 * 32-bit counter is not a reboot. Notes every message that is not a repeat.
 */
export function intake(state: ProcessorState, m: SensorMessage): 'new' | 'duplicate' | 'reboot' {
  const s = sensorStateOf(state, m);
  if (s.recentT.includes(m.tMs)) return 'duplicate';
  let verdict: 'new' | 'reboot' = 'new';
  if (m.seq !== undefined && s.lastSeq !== undefined && m.seq < s.lastSeq && m.tMs > s.lastTMs) {
    if (!wrapped(s.lastSeq, m.seq)) verdict = 'reboot';
    s.recentSeq = [];
  }
  if (verdict === 'new' && m.seq !== undefined && s.recentSeq.includes(m.seq)) return 'duplicate';
  s.recentT.push(m.tMs);
  if (s.recentT.length > RECENT_IDS) s.recentT.shift();
  if (m.seq !== undefined) {
    s.recentSeq.push(m.seq);
    if (s.recentSeq.length > RECENT_IDS) s.recentSeq.shift();
  }
  if (m.tMs > s.lastTMs) {
    s.lastTMs = m.tMs;
    if (m.seq !== undefined) s.lastSeq = m.seq;
  }
  s.count++;
  return verdict;
}

/** True for a message already seen (same time or same seq as a recent one); otherwise notes it. */
export function isDuplicate(state: ProcessorState, m: SensorMessage): boolean {
  return intake(state, m) === 'duplicate';
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
