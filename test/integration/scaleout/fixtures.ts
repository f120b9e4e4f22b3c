// Shared by the scale-out test and benchmark: two fictional sites derived from the demo reef, their
// simulated messages produced to Kafka through the edge bridge, and record identity for comparisons.
import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { parseMessage, type DerivedRecord, type ReefdConfig } from '../../../libs/contract/index.js';
import { simulateMessages } from '../../../libs/simulator/index.js';
import { loadConfigOrThrow } from '../../../services/config/load.js';
import type { Logger } from '../../../services/log/logger.js';
import { createEdgeBridge } from '../../../services/scaleout/edge-bridge.js';
import { partitionOfSite } from '../../../services/scaleout/partition.js';

const DEMO = path.resolve(import.meta.dirname, '../../../deploy/demo/ornen-reef.yaml');

/** Two sites with the demo's stations and transects that the site partitioner puts on different partitions. */
export async function twoSites(partitions: number): Promise<ReefdConfig[]> {
  const demo = await loadConfigOrThrow(DEMO);
  const names = [
    'isle-north',
    'isle-south',
    'isle-east',
    'isle-west',
    'isle-mid',
    'isle-far',
    'cay-1',
    'cay-2',
    'cay-3',
    'cay-4',
  ];
  const first = names[0] ?? '';
  const second = names.find((n) => partitionOfSite(n, partitions) !== partitionOfSite(first, partitions));
  if (second === undefined) throw new Error('no two candidate site names on different partitions');
  return [first, second].map((site) => ({ ...demo, site }) as ReefdConfig);
}

/** The simulated messages of every site, in send order, parsed as the edge's pipeline accepts them. */
export function deployment(sites: readonly ReefdConfig[], startMs: number, durationMs: number) {
  const all = sites.flatMap((cfg, i) =>
    simulateMessages(cfg, { startMs, durationMs, seed: 11 + i }).messages.map((m) => ({
      cfg,
      topic: m.topic,
      text: JSON.stringify(m.payload),
      tMs: m.tMs,
    })),
  );
  all.sort((a, b) => a.tMs - b.tMs);
  return all.flatMap((m) => {
    const parsed = parseMessage(m.topic, m.text, 'reef');
    return parsed.ok ? [{ message: parsed.message, rxMs: m.tMs + 500 }] : [];
  });
}

/** Produces the messages through the edge bridge (site partitioner, spooled ordered producer). */
export async function produceViaEdge(
  brokers: readonly string[],
  topic: string,
  msgs: ReturnType<typeof deployment>,
  logger: Logger,
): Promise<void> {
  const spoolDir = await mkdtemp(path.join(tmpdir(), 'reefd-edge-'));
  const bridge = await createEdgeBridge({
    brokers,
    clientId: 'reefd-it-edge',
    topic,
    spoolDir,
    spoolMaxMb: 256,
    logger,
  });
  for (const m of msgs) bridge.forward(m.message, m.rxMs);
  await bridge.flush();
  await bridge.close();
}

/** Identity of a derived record: type, site, station or transect, time (and, for alerts, the episode). */
export function recordId(r: DerivedRecord): string {
  const x = r as unknown as Record<string, unknown>;
  const where = (x.transect ?? x.station ?? '-') as string;
  const extra = r.type === 'alert' ? `|${String(x.rule)}|${String(x.sensor ?? '')}|${String(x.state)}` : '';
  return `${r.type}|${r.site}|${where}|${r.t}${extra}`;
}

/**
 * Records by identity; `dups` counts identities seen more than once, `conflicts` those seen again with
 * different content (a re-emitted record must be the same record).
 */
export function byId(records: readonly DerivedRecord[]): {
  map: Map<string, string>;
  dups: number;
  conflicts: string[];
} {
  const map = new Map<string, string>();
  let dups = 0;
  const conflicts: string[] = [];
  for (const r of records) {
    const id = recordId(r);
    const json = JSON.stringify(r);
    const seen = map.get(id);
    if (seen !== undefined) {
      dups++;
      if (seen !== json) conflicts.push(id);
      continue;
    }
    map.set(id, json);
  }
  return { map, dups, conflicts };
}
