// The field log as markers on time plots (docs/methods/calibration.md 13.6): what happened at a station or a
// sensor, when, and the span its data are excluded, for the plots of a time range. Pure: the dashboard (or
// any other reader) calls it with the parsed logbook entries and the range it draws.
import type { LogbookEntry, LogbookEvent } from '../contract/index.js';

export interface LogbookMarker {
  /** ISO time of the event (UTC). */
  t: string;
  tMs: number;
  station: string;
  /** The sensor, or null for the whole station. */
  sensor: string | null;
  event: LogbookEvent;
  /** A short label for the plot: the event, the sensor, and the note's first line (at most 60 characters). */
  label: string;
  text: string;
  /** The excluded span, [fromMs, toMs), or null when the entry excludes nothing. */
  exclusion: { fromMs: number; toMs: number; from: string; to: string } | null;
}

export interface MarkerQuery {
  /** The plotted range [fromMs, toMs): events in it, and exclusions overlapping it. */
  fromMs: number;
  toMs: number;
  /** Only entries of this station (station-wide ones and those of its sensors). */
  station?: string;
  /** With station: only entries of this sensor and the station-wide ones. */
  sensor?: string;
}

const MAX_LABEL = 60;

function labelOf(e: LogbookEntry): string {
  const head = e.sensor === undefined ? e.event : `${e.event} ${e.sensor}`;
  const note = (e.text ?? '').split('\n')[0]?.trim() ?? '';
  const full = note === '' ? head : `${head}: ${note}`;
  return full.length <= MAX_LABEL ? full : `${full.slice(0, MAX_LABEL - 1)}\u2026`;
}

/** The markers of the entries that concern the query, in time order (then station, sensor). */
export function logbookMarkers(entries: readonly LogbookEntry[], q: MarkerQuery): LogbookMarker[] {
  const out: LogbookMarker[] = [];
  for (const e of entries) {
    if (q.station !== undefined && e.station !== q.station) continue;
    if (q.sensor !== undefined && e.sensor !== undefined && e.sensor !== q.sensor) continue;
    const tMs = Date.parse(e.t);
    const ex =
      e.exclude_from !== undefined && e.exclude_to !== undefined
        ? { fromMs: Date.parse(e.exclude_from), toMs: Date.parse(e.exclude_to) }
        : null;
    const eventIn = tMs >= q.fromMs && tMs < q.toMs;
    const exclusionIn = ex !== null && ex.fromMs < q.toMs && q.fromMs < ex.toMs;
    if (!eventIn && !exclusionIn) continue;
    out.push({
      t: new Date(tMs).toISOString(),
      tMs,
      station: e.station,
      sensor: e.sensor ?? null,
      event: e.event,
      label: labelOf(e),
      text: e.text ?? '',
      exclusion:
        ex === null
          ? null
          : { ...ex, from: new Date(ex.fromMs).toISOString(), to: new Date(ex.toMs).toISOString() },
    });
  }
  return out.sort(
    (a, b) =>
      a.tMs - b.tMs ||
      (a.station < b.station ? -1 : a.station > b.station ? 1 : 0) ||
      ((a.sensor ?? '') < (b.sensor ?? '') ? -1 : (a.sensor ?? '') > (b.sensor ?? '') ? 1 : 0),
  );
}
