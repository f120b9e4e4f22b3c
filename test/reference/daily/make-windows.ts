// Writes test/reference/daily/windows.json: one local day of the fictional reef's flux windows (both transects),
// as the processor computes them, with the window-mean PAR, so the reference generator (generate.py) fits the
// very windows the daily library fits. Run once when the simulator or the processor changes:
//   npx tsx test/reference/daily/make-windows.ts
import { readFileSync, writeFileSync } from 'node:fs';
import { parseConfigText, parseMessage } from '../../../libs/contract/index.js';
import { createProcessor } from '../../../libs/processor/index.js';
import { simulateMessages } from '../../../libs/simulator/index.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config invalid');
const startMs = Date.UTC(2026, 7, 3, 10); // local midnight at UTC-10
const sim = simulateMessages(parsed.config, { startMs, durationMs: 26 * 3.6e6, seed: 41, faults: false });
const processor = createProcessor(parsed.config);
const par: [number, number][] = [];
const flux: Record<string, unknown>[] = [];
for (const m of sim.messages) {
  const r = parseMessage(m.topic, JSON.stringify(m.payload));
  if (!r.ok) continue;
  if (m.topic.includes('/par/'))
    par.push([Date.parse(m.payload.t as string), m.payload.par_umol_m2_s as number]);
  for (const rec of processor.push(r.message, m.tMs + 300).records) if (rec.type === 'flux') flux.push(rec);
}
const W = parsed.config.processing.window_min * 60_000;
const windows = flux
  .filter((f) => Date.parse(f.t as string) >= startMs && Date.parse(f.t as string) < startMs + 24 * 3.6e6)
  .map((f) => {
    const c = Date.parse(f.t as string);
    const inside = par.filter(([t]) => t >= c - W / 2 && t < c + W / 2).map(([, v]) => v);
    return {
      transect: f.transect,
      t: f.t,
      valid: f.valid,
      ncp: f.ncp_mmol_m2_h,
      ncp_sigma: f.ncp_sigma_mmol_m2_h,
      nec: f.nec_mmol_m2_h,
      nec_sigma: f.nec_sigma_mmol_m2_h,
      par: inside.length
        ? Math.round((inside.reduce((a, b) => a + b, 0) / inside.length) * 1000) / 1000
        : null,
    };
  });
writeFileSync(
  'test/reference/daily/windows.json',
  JSON.stringify(
    { source: 'libs/simulator seed 41 through libs/processor, 2026-08-03 (UTC-10)', windows },
    null,
    0,
  ) + '\n',
);
console.log(`wrote ${windows.length} windows`);
