// From an archive line to a processor input: the same validation the live intake applies, so replay,
// restart-resume and the daemon accept and reject exactly the same messages.
import {
  parseTopic,
  validatePayload,
  type ArchiveLine,
  type ReefdConfig,
  type SensorMessage,
} from '../contract/index.js';

/**
 * Checks a schema-valid message against the configuration: a station, sensor and kind it knows. Returns the
 * reject reason, or undefined. Called before archiving so the archive marks such messages as rejected.
 */
export function checkAgainstConfig(config: ReefdConfig, m: SensorMessage): string | undefined {
  if (m.site !== config.site) return 'unknown_site';
  const st = config.stations[m.station];
  if (st === undefined) return 'unknown_station';
  const s = st.sensors[m.sensor];
  if (s === undefined) return 'unknown_sensor';
  if (s.kind !== m.kind) return 'kind_mismatch';
  return undefined;
}

export type ArchiveInput = { ok: true; message: SensorMessage; rxMs: number } | { ok: false; reason: string };

export function messageFromArchiveLine(config: ReefdConfig, line: ArchiveLine): ArchiveInput {
  const rxMs = Date.parse(line.rx);
  if (!Number.isFinite(rxMs)) return { ok: false, reason: 'bad_rx' };
  const tp = parseTopic(line.topic, config.topic_prefix);
  if (!tp.ok) return { ok: false, reason: tp.reason };
  // A payload that was not JSON is archived as its text.
  if (typeof line.msg === 'string') return { ok: false, reason: line.reject ?? 'json_syntax' };
  const v = validatePayload(tp.parts, line.msg);
  if (!v.ok) return { ok: false, reason: v.reason };
  const why = checkAgainstConfig(config, v.message);
  if (why !== undefined) return { ok: false, reason: why };
  return { ok: true, message: v.message, rxMs };
}
