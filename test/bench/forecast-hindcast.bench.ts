// Benchmark: the skill of tonight's oxygen forecast (issue 15), as a hindcast over simulated nights of the
// fictional reef. Each deployment is simulated (libs/simulator, its seed) and run through the processor, which
// writes the `forecast` records itself (dusk and hourly until sunrise, live and replay alike); every forecast
// is scored against the minimum of the model's true O2 before sunrise (hindcast-driver.ts). Baseline measured
// in the same run: persistence (tonight's minimum = the O2 at the issue time).
// Printed per station: nights, mean absolute error of the minimum, the share within 0.5 mg/L, the coverage of
// the 80 % interval, and the MAE as a ratio to persistence. The first three nights of each deployment are
// spin-up (no fits, no calibration yet) and are left out.
// A second run with the scripted faults shows the lagoon's low-oxygen nights (a bloom's sudden demand that no
// history predicts): how long before the water crosses 2 mg/L the hourly forecasts said it would, and when the
// built-in rule low_oxygen_expected was raised.
// Run: npm run bench forecast-hindcast   (REEFD_HINDCAST_SEEDS=71,72 REEFD_HINDCAST_DAYS=18)
import { readFileSync } from 'node:fs';
import { parseConfigText, parseMessage, type DerivedRecord } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import { simulateMessages, type EventTruth, type StationTruth } from '../../libs/simulator/index.js';
import { scoreForecasts, type ScoredForecast, type TruthO2 } from './hindcast-driver.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config invalid');
const config = parsed.config;
const seeds = (process.env.REEFD_HINDCAST_SEEDS ?? '71,72').split(',').map(Number);
const days = Number(process.env.REEFD_HINDCAST_DAYS ?? 18);
const SPIN_UP_MS = 3.5 * 86_400_000;

function deployment(seed: number, startMs: number, durationDays: number, faults: boolean) {
  const t0 = performance.now();
  const sim = simulateMessages(config, {
    startMs,
    durationMs: durationDays * 86_400_000,
    seed,
    faults,
    timeZone: config.timezone,
  });
  const t1 = performance.now();
  const processor = createProcessor(config);
  const records: DerivedRecord[] = [];
  for (const m of sim.messages) {
    const r = parseMessage(m.topic, JSON.stringify(m.payload));
    if (!r.ok) continue;
    for (const rec of processor.push(r.message, m.tMs + 300).records)
      if (rec.type === 'forecast' || rec.type === 'alert' || rec.type === 'daily') records.push(rec);
  }
  records.push(...processor.drain());
  const t2 = performance.now();
  const truth: TruthO2[] = sim.truth.filter((t): t is StationTruth => t.kind === 'station');
  const events = sim.truth.filter((t): t is EventTruth => t.kind === 'event').map((e) => e.centreMs);
  const all = scoreForecasts(records, truth);
  const state = processor.snapshot();
  console.log(
    `seed ${seed}: ${durationDays} days${faults ? ' with faults' : ''}, simulate ${((t1 - t0) / 1000).toFixed(0)} s, ` +
      `process ${((t2 - t1) / 1000).toFixed(0)} s, ${records.filter((r) => r.type === 'forecast').length} forecasts, ` +
      `daily + forecast state ${((JSON.stringify(state.daily).length + JSON.stringify(state.forecast).length) / 1024).toFixed(0)} kB ` +
      `of JSON at the end (whole checkpoint ${(JSON.stringify(state).length / 1024).toFixed(0)} kB)`,
  );
  const scored = all.filter((s) => s.issueMs - startMs >= SPIN_UP_MS);
  // Warnings raised on nights without a scripted event are false alarms.
  const warnings = records.filter(
    (r) => r.type === 'alert' && r.rule === 'low_oxygen_expected' && r.state === 'raised',
  );
  const falseAlarms = warnings.filter((w) => !events.some((c) => Math.abs(Date.parse(w.t) - c) < 12 * 3.6e6));
  console.log(
    `  low_oxygen_expected raised ${warnings.length} times, ${falseAlarms.length} on nights without an event`,
  );
  return { scored, events, truth, records };
}

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
function row(name: string, sel: ScoredForecast[]): string {
  const e = sel.map((r) => Math.abs(r.central - r.truthMin));
  const ep = sel.map((r) => Math.abs(r.persistence - r.truthMin));
  const within = e.filter((x) => x <= 0.5).length / Math.max(1, e.length);
  const cover = sel.filter((r) => r.truthMin >= r.lo && r.truthMin <= r.hi).length / Math.max(1, sel.length);
  return [
    name.padEnd(20),
    String(sel.length).padStart(6),
    mean(e).toFixed(3).padStart(8),
    `${(100 * within).toFixed(0)} %`.padStart(9),
    `${(100 * cover).toFixed(0)} %`.padStart(9),
    mean(ep).toFixed(3).padStart(9),
    (mean(e) / mean(ep)).toFixed(2).padStart(7),
  ].join(' ');
}

const startMs = Date.UTC(2026, 1, 20, 10); // local midnight at UTC-10
const eventsOnly = process.env.REEFD_HINDCAST_EVENTS_ONLY === '1';
const clean = (eventsOnly ? [] : seeds).flatMap(
  (seed, i) => deployment(seed, startMs + i * 40 * 86_400_000, days, false).scored,
);
if (!eventsOnly) printSkill();

function printSkill(): void {
  const header = `${'station'.padEnd(20)} ${'n'.padStart(6)} ${'MAE mg/L'.padStart(8)} ${'<=0.5'.padStart(9)} ${'cover80'.padStart(9)} ${'pers MAE'.padStart(9)} ${'ratio'.padStart(7)}`;
  for (const [title, pick] of [
    ['dusk forecasts (one per station and night)', (r: ScoredForecast) => r.lead === 0],
    ['all forecasts (dusk and hourly to sunrise)', () => true],
  ] as const) {
    console.log(`\n${title}; ratio = MAE / persistence MAE (baseline, same run)`);
    console.log(header);
    const sel = clean.filter(pick);
    for (const st of [...new Set(sel.map((r) => r.station))]) {
      const s = sel.filter((r) => r.station === st);
      console.log(row(`${st} (${s[0]!.model})`, s));
    }
    console.log(row('all stations', sel));
  }
  const dusk = clean.filter((r) => r.lead === 0);
  const within = dusk.filter((r) => Math.abs(r.central - r.truthMin) <= 0.5).length / dusk.length;
  const cover = clean.filter((r) => r.truthMin >= r.lo && r.truthMin <= r.hi).length / clean.length;
  console.log(
    `\ntargets (issue 15): dusk minimum within 0.5 mg/L on >= 80 % of station-nights: ${(100 * within).toFixed(0)} % ` +
      `${within >= 0.8 ? 'met' : 'MISSED'}; interval coverage 80 +- 10 %: ${(100 * cover).toFixed(0)} % ` +
      `${Math.abs(cover - 0.8) <= 0.1 ? 'met' : 'MISSED'}`,
  );
}

// The scripted low-oxygen nights of the lagoon (with faults).
const f = deployment(seeds[0]!, startMs + 200 * 86_400_000, 10, true);
console.log('\nlagoon low-oxygen nights (scripted; not predictable from history):');
for (const c of f.events) {
  const lag = f.truth.filter(
    (t) => t.station === 'lagoon' && Date.parse(t.t) > c - 12 * 3.6e6 && Date.parse(t.t) < c + 6 * 3.6e6,
  );
  const cross = lag.find((t) => t.o2_mg_l < 2);
  // The forecasts of the night that holds the event (issued before its sunrise, the first after the centre).
  const night = f.scored.filter(
    (r) => r.station === 'lagoon' && c < r.sunriseMs && r.sunriseMs - c < 16 * 3.6e6,
  );
  if (!cross || night.length === 0) continue;
  const crossMs = Date.parse(cross.t);
  const warned = night.find((r) => r.central < 2 && r.issueMs <= crossMs);
  const dusk0 = night.find((r) => r.lead === 0)!;
  const last = night.filter((r) => r.issueMs <= crossMs).at(-1)!;
  // The alerts of that night at the lagoon: the forecast's warning against the measured alarm.
  const raisedAt = (rule: string) => {
    const a = f.records.find(
      (r) =>
        r.type === 'alert' &&
        r.rule === rule &&
        r.state === 'raised' &&
        r.station === 'lagoon' &&
        Date.parse(r.t) > dusk0.issueMs - 3.6e6 &&
        Date.parse(r.t) < dusk0.sunriseMs,
    );
    return a ? a.t.slice(11, 16) : 'not raised';
  };
  console.log(
    `  ${new Date(c).toISOString().slice(0, 16)}: truth min ${Math.min(...lag.map((t) => t.o2_mg_l)).toFixed(2)} mg/L, ` +
      `below 2 mg/L at ${cross.t.slice(11, 16)}; dusk forecast ${dusk0.central.toFixed(2)}; first forecast below 2 mg/L ` +
      (warned
        ? `${((crossMs - warned.issueMs) / 3.6e6).toFixed(1)} h before the crossing`
        : 'none before the crossing') +
      `; last before it (${new Date(last.issueMs).toISOString().slice(11, 16)}): ${last.central.toFixed(2)} ` +
      `[${last.lo.toFixed(2)}, ${last.hi.toFixed(2)}]; low_oxygen_expected ${raisedAt('low_oxygen_expected')}, ` +
      `low_oxygen ${raisedAt('low_oxygen')}`,
  );
}
