// The fictional demo site run through the real processor in this process, for the dashboard's tests and
// previews: the simulator's messages (libs/simulator) parsed and pushed like the daemon does, giving the
// records, alerts and sensor health a live run would show, deterministically for a seed.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  parseConfigText,
  parseMessage,
  type DerivedRecord,
  type ReefdConfig,
} from '../../libs/contract/index.js';
import { checkAgainstConfig, createProcessor, type Processor } from '../../libs/processor/index.js';
import { simulate } from '../../libs/simulator/index.js';
import { packageRoot } from '../paths.js';
import type { SensorHealthRow } from './sensor-watch.js';

export function demoSiteConfig(): ReefdConfig {
  const r = parseConfigText(
    readFileSync(path.join(packageRoot(), 'deploy', 'demo', 'ornen-reef.yaml'), 'utf8'),
  );
  if (!r.ok) throw new Error(`the demo configuration is invalid: ${JSON.stringify(r.problems)}`);
  return r.config;
}

export interface DemoRun {
  config: ReefdConfig;
  processor: Processor;
  /**
   * Every record in derivation order, with the sample time of the message that produced it and (with
   * `health: true`) the processor's per-sensor rows right after it.
   */
  batches: { tMs: number; records: DerivedRecord[]; health?: SensorHealthRow[] }[];
}

/** Runs `hours` of the demo from `startMs` through one processor. */
export function runDemo(o: {
  startMs: number;
  hours: number;
  seed: number;
  config?: ReefdConfig;
  health?: boolean;
}): DemoRun {
  const config = o.config ?? demoSiteConfig();
  const processor = createProcessor(config);
  const batches: DemoRun['batches'] = [];
  for (const ev of simulate(config, { startMs: o.startMs, durationMs: o.hours * 3_600_000, seed: o.seed })) {
    if (ev.type !== 'message') continue;
    const m = ev.message;
    const p = parseMessage(m.topic, Buffer.from(JSON.stringify(m.payload)), config.topic_prefix);
    if (!p.ok || checkAgainstConfig(config, p.message) !== undefined) continue;
    const r = processor.push(p.message, m.tMs + 200);
    const records = r.records;
    if (records.length > 0 || o.health)
      batches.push({ tMs: m.tMs, records, ...(o.health ? { health: processor.sensorHealth() } : {}) });
  }
  return { config, processor, batches };
}

const iso = (ms: number) => new Date(ms).toISOString();

/**
 * Daily budgets of each transect for the `days` local days before `beforeMs`, in the shape of the `daily`
 * record (docs/contract-v1.md). Constructed (fictional numbers in a plausible range) until the processor
 * writes them.
 */
export function constructedDaily(
  config: ReefdConfig,
  beforeMs: number,
  days: number,
  utcOffsetH: number,
): DerivedRecord[] {
  const out: DerivedRecord[] = [];
  const localMidnight =
    Math.floor((beforeMs + utcOffsetH * 3_600_000) / 86_400_000) * 86_400_000 - utcOffsetH * 3_600_000;
  Object.keys(config.transects).forEach((transect, k) => {
    for (let d = days; d >= 1; d--) {
      const t = localMidnight - d * 86_400_000;
      const ncp = 14 - 6 * k + 3 * d;
      const r = 150 + 10 * k - 4 * d;
      const necDay = 55 - 5 * d;
      const necNight = 12 + 2 * k;
      out.push({
        type: 'daily',
        site: config.site,
        t: iso(t),
        transect,
        day: iso(t + utcOffsetH * 3_600_000).slice(0, 10),
        ncp_mmol_m2_d: ncp,
        ncp_mmol_m2_d_sigma: 9,
        r_mmol_m2_d: r,
        r_mmol_m2_d_sigma: 12,
        gpp_mmol_m2_d: ncp + r,
        gpp_mmol_m2_d_sigma: 15,
        nec_mmol_m2_d: necDay + necNight,
        nec_mmol_m2_d_sigma: 30,
        nec_day_mmol_m2_d: necDay,
        nec_day_mmol_m2_d_sigma: 22,
        nec_night_mmol_m2_d: necNight,
        nec_night_mmol_m2_d_sigma: 18,
        coverage: d === 1 ? 0.58 : 0.86,
        gap_filled: d === 1 ? 0.3 : 0.08,
        pmax_mmol_m2_h: 32,
        ik_umol_m2_s: 420,
        valid: d !== 1,
      } as DerivedRecord);
    }
  });
  return out;
}

/**
 * Forecasts of the night's lowest oxygen at a station, issued hourly from `fromMs` to `toMs` for a minimum at
 * `minMs`, in the shape of the `forecast` record. Constructed until the processor issues them.
 */
export function constructedForecasts(
  config: ReefdConfig,
  station: string,
  fromMs: number,
  toMs: number,
  minMs: number,
  o2MinMgL: number,
): DerivedRecord[] {
  const out: DerivedRecord[] = [];
  for (let t = fromMs; t <= toMs; t += 3_600_000)
    out.push({
      type: 'forecast',
      site: config.site,
      t: iso(t),
      station,
      o2_min_mg_l: o2MinMgL,
      o2_min_lo_mg_l: o2MinMgL - 0.4,
      o2_min_hi_mg_l: o2MinMgL + 0.45,
      t_min: iso(minMs),
      horizon_h: (minMs - t) / 3_600_000,
    } as DerivedRecord);
  return out;
}
