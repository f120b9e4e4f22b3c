// The field logbook (docs/contract-v1.md, `logbook_file`; docs/methods/calibration.md 13.6): what the
// technicians did on the reef and when, and the hours whose data must not be used. Pure: parsing and
// checking the YAML text, and the exclusion lookup the processor calls for each message.
import { isNode, LineCounter, parseDocument } from 'yaml';
import { logbookFileSchema, type LogbookEntry, type ReefdConfig } from '../contract/index.js';

export {
  LOGBOOK_EVENTS,
  logbookEntrySchema,
  logbookFileSchema,
  type LogbookEntry,
  type LogbookEvent,
} from '../contract/index.js';

/** Reason given with flag 4 for data inside an exclusion (docs/contract-v1.md). */
export const LOGBOOK_EXCLUSION_REASON = 'logbook_exclusion';

export interface LogbookProblem {
  path: string;
  message: string;
  line?: number;
}

export type LogbookParse =
  | { ok: true; entries: LogbookEntry[] }
  | { ok: false; code: 'REEFD_LOGBOOK_INVALID'; problems: LogbookProblem[] };

/** Parses logbook YAML (empty = no entries) and checks stations and sensors against the config when given. */
export function parseLogbookText(text: string, config?: ReefdConfig): LogbookParse {
  const lc = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lc, uniqueKeys: true });
  const fail = (problems: LogbookProblem[]): LogbookParse => ({
    ok: false,
    code: 'REEFD_LOGBOOK_INVALID',
    problems,
  });
  if (doc.errors.length > 0) {
    return fail(
      doc.errors.map((e) => {
        const p: LogbookProblem = { path: '(file)', message: e.message.split('\n')[0] ?? e.message };
        if (e.linePos?.[0]) p.line = e.linePos[0].line;
        return p;
      }),
    );
  }
  const lineOf = (path: readonly (string | number)[]): number | undefined => {
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return lc.linePos(node.range[0]).line;
    }
    return undefined;
  };
  const located = (path: (string | number)[], message: string): LogbookProblem => {
    const line = lineOf(path);
    const p: LogbookProblem = { path: path.join('.') || '(file)', message };
    if (line !== undefined) p.line = line;
    return p;
  };
  const r = logbookFileSchema.safeParse(doc.toJS({ maxAliasCount: 50 }) ?? []);
  if (!r.success) {
    return fail(
      r.error.issues.map((i) =>
        located(
          i.path.map((k) => (typeof k === 'number' ? k : String(k))),
          i.code === 'unrecognized_keys'
            ? `unknown key(s) ${i.keys.map((k) => `"${k}"`).join(', ')}`
            : i.message,
        ),
      ),
    );
  }
  if (config !== undefined) {
    const problems = checkLogbook(r.data, config).map((p) => located(p.path, p.message));
    if (problems.length > 0) return fail(problems);
  }
  return { ok: true, entries: r.data };
}

/** Entries naming a station or sensor the configuration does not have. */
export function checkLogbook(
  entries: readonly LogbookEntry[],
  config: ReefdConfig,
): { path: (string | number)[]; message: string }[] {
  const out: { path: (string | number)[]; message: string }[] = [];
  entries.forEach((e, i) => {
    const st = config.stations[e.station];
    if (st === undefined)
      out.push({ path: [i, 'station'], message: `station "${e.station}" is not in the configuration` });
    else if (e.sensor !== undefined && st.sensors[e.sensor] === undefined)
      out.push({ path: [i, 'sensor'], message: `station "${e.station}" has no sensor "${e.sensor}"` });
  });
  return out;
}

interface Interval {
  fromMs: number;
  toMs: number;
  entry: LogbookEntry;
}

/** Exclusions indexed by station (station-wide) and by station/sensor, each sorted by start. */
export interface ExclusionIndex {
  readonly byKey: ReadonlyMap<string, readonly Interval[]>;
  readonly count: number;
}

export function buildExclusionIndex(entries: readonly LogbookEntry[]): ExclusionIndex {
  const byKey = new Map<string, Interval[]>();
  let count = 0;
  for (const e of entries) {
    if (e.exclude_from === undefined || e.exclude_to === undefined) continue;
    const key = e.sensor === undefined ? e.station : `${e.station}/${e.sensor}`;
    const list = byKey.get(key) ?? [];
    list.push({ fromMs: Date.parse(e.exclude_from), toMs: Date.parse(e.exclude_to), entry: e });
    byKey.set(key, list);
    count++;
  }
  for (const list of byKey.values()) list.sort((a, b) => a.fromMs - b.fromMs);
  return { byKey, count };
}

function findIn(list: readonly Interval[] | undefined, tMs: number): LogbookEntry | undefined {
  if (list === undefined) return undefined;
  // Intervals may overlap, so every interval starting at or before tMs is a candidate; lists are short
  // (a deployment has tens of exclusions), and the binary search bounds the scan from above.
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((list[mid] as Interval).fromMs <= tMs) lo = mid + 1;
    else hi = mid;
  }
  for (let i = lo - 1; i >= 0; i--) {
    const iv = list[i] as Interval;
    if (tMs < iv.toMs) return iv.entry;
  }
  return undefined;
}

/**
 * The logbook entry that excludes a sensor's data at tMs (the station's exclusions, then the sensor's), or
 * undefined. The range is [exclude_from, exclude_to). The processor flags such data 4 with reason
 * `logbook_exclusion`.
 */
export function exclusionAt(
  index: ExclusionIndex,
  station: string,
  sensor: string,
  tMs: number,
): LogbookEntry | undefined {
  if (index.count === 0) return undefined;
  return findIn(index.byKey.get(station), tMs) ?? findIn(index.byKey.get(`${station}/${sensor}`), tMs);
}

/**
 * The entries whose exclusion overlaps [fromMs, toMs) for a sensor (the station's, then the sensor's own), in
 * order of start. A flux window with an input so excluded is not valid (docs/methods/calibration.md 13.6).
 */
export function exclusionsDuring(
  index: ExclusionIndex,
  station: string,
  sensor: string,
  fromMs: number,
  toMs: number,
): LogbookEntry[] {
  if (index.count === 0) return [];
  const out: LogbookEntry[] = [];
  for (const key of [station, `${station}/${sensor}`]) {
    for (const iv of index.byKey.get(key) ?? []) {
      if (iv.fromMs >= toMs) break; // sorted by start
      if (iv.toMs > fromMs) out.push(iv.entry);
    }
  }
  return out;
}

/** One entry as YAML list item text (appended by `reefd logbook add`). */
export function formatLogbookEntry(e: LogbookEntry): string {
  const lines = [`- t: ${e.t}`, `  station: ${e.station}`];
  if (e.sensor !== undefined) lines.push(`  sensor: ${e.sensor}`);
  lines.push(`  event: ${e.event}`);
  if (e.text !== undefined) lines.push(`  text: ${JSON.stringify(e.text)}`);
  if (e.exclude_from !== undefined) lines.push(`  exclude_from: ${e.exclude_from}`);
  if (e.exclude_to !== undefined) lines.push(`  exclude_to: ${e.exclude_to}`);
  return `${lines.join('\n')}\n`;
}
