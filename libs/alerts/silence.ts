// The site dead-man (docs/contract-v1.md sections 3 and 4, E2/E3): `site_silent` (class `fault`, fault `silent`) when no accepted message has
// come from the site for `silenceMs` of wall-clock time, cleared on the next message. Unlike every other rule this
// one runs on the wall clock, so only the live daemon calls it (never a replay, whose records must depend on the
// messages alone). Pure: the daemon passes the wall time in, schedules its timer at nextCheckMs(), and keeps the
// plain-JSON state with its own (a raised silence survives a restart and is cleared by the first message after).

import type { Severity } from '../contract/index.js';
import { alertId } from './id.js';
import type { AlertRecord } from './types.js';

export interface SiteSilenceSettings {
  /** Wall-clock silence that raises, ms (alerts.silence_min, default 15 min). */
  readonly silenceMs: number;
  readonly severity: Severity;
}

export interface SiteSilenceState {
  v: 1;
  site: string;
  /** Wall time of the last accepted message, or of the start when none came yet, ms. */
  lastMs: number;
  /** When the current episode was raised, ms; null when not raised. */
  raisedAtMs: number | null;
}

export const SITE_SILENT_RULE = 'site_silent';

/** State for a daemon started at `startWallMs`: a site that never speaks is silent silenceMs after the start. */
export const createSiteSilence = (site: string, startWallMs: number): SiteSilenceState => ({
  v: 1,
  site,
  lastMs: startWallMs,
  raisedAtMs: null,
});

function record(
  st: SiteSilenceState,
  cfg: SiteSilenceSettings,
  state: AlertRecord['state'],
  tMs: number,
  silenceMs: number,
  raisedAtMs: number,
): AlertRecord {
  const r: AlertRecord = {
    type: 'alert',
    site: st.site,
    t: new Date(tMs).toISOString(),
    rule: SITE_SILENT_RULE,
    class: 'fault',
    state,
    value: Math.round(silenceMs / 1000),
    limit: cfg.silenceMs / 1000,
    fault: 'silent',
    id: alertId(`${st.site}\u001f${SITE_SILENT_RULE}`, raisedAtMs),
    severity: cfg.severity,
  };
  if (state === 'cleared') r.raised_t = new Date(raisedAtMs).toISOString();
  return r;
}

/**
 * An accepted message at wall time wallMs: clears a raised silence (its `value` is the whole silence in seconds).
 * A wall clock stepped backwards never makes the last message later.
 */
export function silenceOnMessage(
  st: SiteSilenceState,
  cfg: SiteSilenceSettings,
  wallMs: number,
): AlertRecord[] {
  const out: AlertRecord[] = [];
  if (st.raisedAtMs !== null) {
    out.push(record(st, cfg, 'cleared', wallMs, Math.max(0, wallMs - st.lastMs), st.raisedAtMs));
    st.raisedAtMs = null;
  }
  if (wallMs > st.lastMs) st.lastMs = wallMs;
  return out;
}

/**
 * A timer tick at wall time wallMs: raises once when the silence is longer than the limit. The record is stamped
 * at the moment the silence passed the limit (last message + limit), like `stale`; `value` is the silence so far.
 */
export function silenceCheck(st: SiteSilenceState, cfg: SiteSilenceSettings, wallMs: number): AlertRecord[] {
  if (st.raisedAtMs !== null || !(wallMs - st.lastMs > cfg.silenceMs)) return [];
  const atMs = st.lastMs + cfg.silenceMs;
  st.raisedAtMs = atMs;
  return [record(st, cfg, 'raised', atMs, wallMs - st.lastMs, atMs)];
}

/** Wall time at which silenceCheck() would next raise (a timer there is enough); null while raised. */
export const silenceNextCheckMs = (st: SiteSilenceState, cfg: SiteSilenceSettings): number | null =>
  st.raisedAtMs !== null ? null : st.lastMs + cfg.silenceMs + 1;

/** The raise record of a silence in force (for the daemon's list of active alerts), or null. */
export function silenceActive(st: SiteSilenceState, cfg: SiteSilenceSettings): AlertRecord | null {
  return st.raisedAtMs === null
    ? null
    : record(st, cfg, 'raised', st.raisedAtMs, cfg.silenceMs, st.raisedAtMs);
}
