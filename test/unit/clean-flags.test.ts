// Flags that mean something (docs/methods/qc.md 7.2; docs/methods/faults.md 12.8): on clean simulated data
// (the fictional Ornen Reef without its scripted faults, two days of two seasons) every flag 3 or 4 is a false
// alarm. Few valid flux records may carry flag 3 (goal 5 %), no derived value may be flagged 3 or 4 by QC more
// than 1 % of the time, no fault may open and no alert may be raised. The false-alarm rate of every single QC
// test is measured in libs/qc/simulated.test.ts; this is what reaches the records.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type DerivedRecord } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config invalid');
const config = parsed.config;

function cleanRun(startMs: number, seed: number) {
  const sim = simulateMessages(config, { startMs, durationMs: 24 * 3_600_000, seed, faults: false });
  const processor = createProcessor(config);
  const records: DerivedRecord[] = [];
  for (const m of sim.messages) {
    const r = parseMessage(m.topic, JSON.stringify(m.payload));
    if (!r.ok) throw new Error(`${m.topic}: ${r.reason}`);
    records.push(...processor.push(r.message, m.tMs + 250).records);
  }
  records.push(...processor.drain());
  // The first hour is the start-up: a burst that comes before the first CTD reading is flagged 3 for its
  // assumed density (docs/methods/waves.md 4.6), and is no false alarm of steady operation.
  const steady = records.filter((r) => Date.parse(r.t) >= startMs + 3_600_000);
  return { records: steady, state: processor.snapshot() };
}

const runs = [cleanRun(Date.UTC(2026, 5, 10), 5), cleanRun(Date.UTC(2026, 2, 1), 11)];
const records = runs.flatMap((r) => r.records);
const flagOf = (r: DerivedRecord): number => (r as { flag?: number }).flag ?? 1;
const pct = (n: number, d: number) => `${((100 * n) / d).toFixed(2)} %`;

describe('clean data: what the flags say', () => {
  it('flags at most 5 % of the valid flux records 3', () => {
    const valid = records.filter((r) => r.type === 'flux' && r.valid);
    const f3 = valid.filter((r) => flagOf(r) === 3);
    console.log(
      `clean flags: ${pct(f3.length, valid.length)} of ${valid.length} valid flux records flagged 3`,
    );
    expect(valid.length).toBeGreaterThan(400);
    expect(f3.length / valid.length).toBeLessThanOrEqual(0.05);
    // what remains is the inverse's steady form where it had no previous solution (docs/methods/metabolism.md 6.5)
    for (const r of f3) expect(String(r.notes)).toMatch(/steady_form|no_storage/);
  });

  it('flags under 1 % of each station record type 3 or 4 by QC or a fault', () => {
    for (const type of ['oxygen', 'carbonate', 'waves', 'current', 'light'] as const) {
      // Records the method could not compute carry their reason and are no alarm (the crest ADCP's
      // wave-troughed top bins leave too few for a depth average on some ensembles, docs/methods/currents.md 5.3).
      const all = records.filter((r) => r.type === type && (r as { reason?: string }).reason === undefined);
      const bad = all.filter((r) => flagOf(r) >= 3);
      console.log(`clean flags: ${type} ${pct(bad.length, all.length)} of ${all.length} flagged 3 or 4`);
      expect(all.length).toBeGreaterThan(100);
      expect(bad.length / all.length).toBeLessThan(0.01);
    }
  });

  it('opens no sensor fault, names no fault and raises no alert', () => {
    for (const run of runs) {
      for (const [key, s] of Object.entries(run.state.faults.sensors)) expect(s.episodes, key).toEqual([]);
    }
    expect(records.filter((r) => r.type === 'alert')).toEqual([]);
    expect(records.filter((r) => /input_(fault|qc_failed)/.test(String(r.invalid_reasons)))).toEqual([]);
  });

  it('compares logger and ADCP depths only where both are measured, and finds them within 5 cm', () => {
    const cur = records.filter((r) => r.type === 'current' && r.depth_diff_m !== undefined);
    expect(cur.length).toBeGreaterThan(800);
    const worst = Math.max(...cur.map((r) => Math.abs(r.depth_diff_m as number)));
    console.log(
      `clean flags: logger - ADCP depth within ${(100 * worst).toFixed(1)} cm over ${cur.length} ensembles`,
    );
    expect(worst).toBeLessThan(0.05);
  });
});
