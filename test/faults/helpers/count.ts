// Counting what arrived: archive lines of a topic prefix (plain and .gz files), and points in the database.
import { readdir } from 'node:fs/promises';
import { join } from 'node:path';
import { readArchive } from '../../../services/archive/index.js';

export interface ArchiveCount {
  /** key (`station/sensor/tMs`) -> number of lines. */
  byKey: Map<string, number>;
  lines: number;
  rejected: number;
  badLines: number;
  /** Lines beyond the first for one key (QoS 1 redeliveries). */
  duplicates: number;
  /** Of those, copies whose payload differs from the first line's: a real conflict, never expected. */
  conflicts: number;
}

export async function countArchive(archiveDir: string, prefix: string): Promise<ArchiveCount> {
  const c: ArchiveCount = {
    byKey: new Map(),
    lines: 0,
    rejected: 0,
    badLines: 0,
    duplicates: 0,
    conflicts: 0,
  };
  const firstPayload = new Map<string, string>();
  let names: string[];
  try {
    names = (await readdir(archiveDir)).filter((n) => /^raw-.*\.ndjson(\.gz)?$/.test(n)).sort();
  } catch {
    return c;
  }
  for (const n of names) {
    for await (const e of readArchive(join(archiveDir, n))) {
      if (e.line === null) {
        c.badLines++;
        continue;
      }
      if (!e.line.topic.startsWith(`${prefix}/`)) continue;
      c.lines++;
      if (e.line.reject !== undefined) c.rejected++;
      const parts = e.line.topic.split('/');
      const msg = e.line.msg as { t?: unknown } | null;
      const tMs = typeof msg === 'object' && msg !== null ? Date.parse(String(msg.t)) : Number.NaN;
      const key = `${parts.at(-3) ?? ''}/${parts.at(-1) ?? ''}/${tMs}`;
      const prev = c.byKey.get(key) ?? 0;
      const text = JSON.stringify(e.line.msg);
      if (prev > 0) {
        c.duplicates++;
        if (firstPayload.get(key) !== text) c.conflicts++;
      } else firstPayload.set(key, text);
      c.byKey.set(key, prev + 1);
    }
  }
  return c;
}

export interface DbCount {
  samples: number;
  /** timestamp -> copies. */
  byTs: Map<number, number>;
  duplicates: number;
  /** Timestamps in the order VictoriaMetrics returns them (ascending). */
  timestamps: number[];
}

/** Samples of one VictoriaMetrics metric (e.g. `oxygen_o2_umol_kg`) for one site tag, all copies kept. */
export async function countVm(url: string, metric: string, site: string): Promise<DbCount> {
  await fetch(`${url}/internal/force_flush`);
  const res = await fetch(`${url}/api/v1/export`, {
    method: 'POST',
    body: new URLSearchParams({ 'match[]': `${metric}{site="${site}"}`, start: '0' }),
  });
  const text = await res.text();
  const c: DbCount = { samples: 0, byTs: new Map(), duplicates: 0, timestamps: [] };
  for (const line of text.split('\n')) {
    if (line.trim() === '') continue;
    const s = JSON.parse(line) as { timestamps: number[] };
    for (const ts of s.timestamps) {
      c.samples++;
      c.timestamps.push(ts);
      const prev = c.byTs.get(ts) ?? 0;
      if (prev > 0) c.duplicates++;
      c.byTs.set(ts, prev + 1);
    }
  }
  c.timestamps.sort((a, b) => a - b);
  return c;
}

export function summary(name: string, fields: Record<string, number | string>): string {
  const line = `fault ${name}: ${Object.entries(fields)
    .map(([k, v]) => `${k} ${v}`)
    .join(', ')}`;
  console.log(line);
  return line;
}

export const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/** Polls `probe` until it returns true or `timeoutMs` passes; returns whether it did (never throws). */
export async function waitFor(
  probe: () => Promise<boolean>,
  timeoutMs: number,
  everyMs = 250,
): Promise<boolean> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    try {
      if (await probe()) return true;
    } catch {
      // not yet
    }
    if (Date.now() > end) return false;
    await sleep(everyMs);
  }
}
