// Daily budgets, tonight's forecast and modelled flow inside the processor (daily-step.ts, forecast-step.ts;
// docs/methods/daily.md 10.8, forecast.md 11.9), on two and a half simulated days of the demo reef: the records
// come once and in order, a restart from the checkpoint continues them exactly, the built-in rule
// low_oxygen_expected watches the forecasts, and an ADCP gap is bridged by the flow model for the configured
// hours only.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  derivedRecordSchema,
  parseConfigText,
  parseMessage,
  type DerivedRecord,
  type SensorMessage,
} from '../contract/index.js';
import { createLocalCalendar, sunEvents } from '../daily/index.js';
import { simulateMessages } from '../simulator/index.js';
import { createProcessor, type ProcessorState } from './index.js';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const DEMO = readFileSync(path.resolve(HERE, '../../deploy/demo/ornen-reef.yaml'), 'utf8');
const HOUR = 3_600_000;
const START_MS = Date.UTC(2026, 2, 3, 4); // 18:00 local (UTC-10)
const END_MS = START_MS + 60 * HOUR;

function configOf(text: string) {
  const p = parseConfigText(text);
  if (!p.ok) throw new Error(JSON.stringify(p.problems));
  return p.config;
}
const config = configOf(DEMO);

const messages: { m: SensorMessage; rxMs: number }[] = simulateMessages(config, {
  startMs: START_MS,
  durationMs: END_MS - START_MS,
  seed: 5,
  faults: false,
}).messages.map((x) => {
  const r = parseMessage(x.topic, JSON.stringify(x.payload));
  if (!r.ok) throw new Error(r.reason);
  return { m: r.message, rxMs: x.tMs + 300 };
});

function run(
  cfg: typeof config,
  keep: (m: SensorMessage) => boolean = () => true,
  splitAt?: number,
): DerivedRecord[] {
  let p = createProcessor(cfg);
  const out: DerivedRecord[] = [];
  messages.forEach(({ m, rxMs }, i) => {
    if (i === splitAt) {
      // A restart from the checkpoint, through its JSON text.
      const state = JSON.parse(JSON.stringify(p.snapshot())) as ProcessorState;
      p = createProcessor(cfg, state);
    }
    if (keep(m)) out.push(...p.push(m, rxMs).records);
  });
  out.push(...p.drain());
  return out;
}

const base = run(config);
const of = <T extends string>(rs: DerivedRecord[], type: T) =>
  rs.filter((r) => r.type === type) as Extract<DerivedRecord, { type: T }>[];
const num = (r: unknown, k: string) => (r as Record<string, unknown>)[k] as number;

describe('daily records from the processor', () => {
  const cal = createLocalCalendar(config.timezone);
  const daily = of(base, 'daily');

  it('one per transect and local day, at the start of the day, once its last window is out, valid when whole', () => {
    const keys = daily.map((d) => `${d.transect} ${d.day}`);
    expect(new Set(keys).size).toBe(keys.length);
    for (const day of ['2026-03-03', '2026-03-04']) {
      for (const tr of ['outer', 'inner']) {
        const d = daily.find((x) => x.transect === tr && x.day === day)!;
        expect(d.t).toBe(new Date(cal.dayBounds(day).startMs).toISOString());
        expect(d.valid).toBe(true);
        expect(d.gpp_mmol_m2_d!).toBeCloseTo(d.ncp_mmol_m2_d! + d.r_mmol_m2_d!, 1);
        expect(derivedRecordSchema.safeParse(d).success).toBe(true);
        // After every flux window centred in the day, before any window of the day after the next cadence.
        const at = base.indexOf(d as DerivedRecord);
        const end = cal.dayBounds(day).endMs;
        const fluxes = base
          .map((r, i) => ({ r, i }))
          .filter((x) => x.r.type === 'flux' && x.r.transect === tr);
        expect(Math.max(...fluxes.filter((x) => Date.parse(x.r.t) < end).map((x) => x.i))).toBeLessThan(at);
        expect(fluxes.find((x) => Date.parse(x.r.t) >= end + 10 * 60_000)!.i).toBeGreaterThan(at);
      }
    }
    // The last local day is not over when the data end: no record for it.
    expect(daily.some((d) => d.day === '2026-03-05')).toBe(false);
  });

  it('every flux window carries the mean PAR of its window from the PAR sensor', () => {
    const flux = of(base, 'flux');
    const light = of(base, 'light');
    const f = flux.find((x) => num(x, 'par_umol_m2_s') > 500)!;
    const c = Date.parse(f.t);
    const inside = light.filter(
      (l) => Date.parse(l.t) >= c - 15 * 60_000 && Date.parse(l.t) < c + 15 * 60_000,
    );
    const mean = inside.reduce((a, l) => a + (l.par_umol_m2_s as number), 0) / inside.length;
    expect(num(f, 'par_umol_m2_s')).toBeCloseTo(mean, 2);
    expect(flux.filter((x) => typeof num(x, 'par_umol_m2_s') === 'number').length).toBe(flux.length);
  });
});

describe('forecast records from the processor', () => {
  const forecasts = of(base, 'forecast');

  it('at dusk and every hour until sunrise, for every oxygen station, each a valid record', () => {
    const stations = ['crest', 'flat', 'back', 'lagoon'];
    // The nights that began after the first (no data before the start) and ended before the data did.
    const sets = sunEvents(START_MS + 12 * HOUR, END_MS, 8.01, -144.932).filter((e) => e.kind === 'set');
    expect(sets.length).toBe(2);
    for (const set of sets) {
      const night = forecasts.filter((f) => Math.abs(Date.parse(f.t) - set.tMs - 5 * HOUR) < 7 * HOUR);
      expect(new Set(night.map((f) => f.station))).toEqual(new Set(stations));
      for (const st of stations) {
        const ts = night.filter((f) => f.station === st).map((f) => Date.parse(f.t));
        expect(Math.abs((ts[0] as number) - set.tMs)).toBeLessThan(1.5 * HOUR);
        for (let i = 1; i < ts.length; i++) expect((ts[i] as number) - (ts[i - 1] as number)).toBe(HOUR);
        expect(ts.length).toBeGreaterThanOrEqual(10);
      }
    }
    for (const f of forecasts) {
      expect(derivedRecordSchema.safeParse(f).success).toBe(true);
      expect(f.o2_min_lo_mg_l!).toBeLessThanOrEqual(f.o2_min_mg_l!);
      expect(f.o2_min_hi_mg_l!).toBeGreaterThanOrEqual(f.o2_min_mg_l!);
      const tMin = Date.parse(f.t_min!);
      expect(tMin).toBeGreaterThanOrEqual(Date.parse(f.t));
      expect(tMin).toBeLessThanOrEqual(Date.parse((f as unknown as { sunrise: string }).sunrise));
      expect(f.horizon_h).toBeCloseTo((tMin - Date.parse(f.t)) / HOUR, 2);
    }
  });

  it('raises low_oxygen_expected from the forecast of each station below the limit (here set to 9 mg/L)', () => {
    const rs = run(configOf(`${DEMO}\nalerts:\n  low_oxygen_expected: { below: 9 }\n`));
    const raised = of(rs, 'alert').filter((a) => a.rule === 'low_oxygen_expected' && a.state === 'raised');
    const first = of(rs, 'forecast').filter((f) => f.o2_min_mg_l! < 9);
    for (const st of ['crest', 'flat', 'back', 'lagoon']) {
      const a = raised.filter((x) => x.station === st);
      const f = first.find((x) => x.station === st)!;
      // Once (it never clears above 9), at the first forecast below, with its value and the limit.
      expect(a.length).toBe(1);
      expect(a[0]).toMatchObject({ class: 'threshold', metric: 'forecast.o2_min_mg_l', t: f.t, limit: 9 });
      expect(a[0]!.value).toBe(f.o2_min_mg_l);
    }
    // With the default limit (2 mg/L, the low-oxygen rule's) these ordinary nights raise nothing.
    expect(of(base, 'alert').some((a) => a.rule === 'low_oxygen_expected')).toBe(false);
  });
});

describe('restart from the checkpoint', () => {
  it('continues the windows, the days and the nights exactly', () => {
    // Split in the second night, after the first day closed and while forecasts are being issued.
    const split = messages.findIndex(({ m }) => m.tMs >= START_MS + 34 * HOUR);
    const restarted = run(config, () => true, split);
    const pick = (rs: DerivedRecord[]) =>
      rs
        .filter((r) => r.type === 'flux' || r.type === 'daily' || r.type === 'forecast')
        .map((r) => JSON.stringify(r));
    expect(pick(restarted)).toEqual(pick(base));
  });
});

describe('modelled flow over an ADCP gap (docs/methods/forecast.md 11.9)', () => {
  const W = config.processing.window_min * 60_000;
  const flat = of(base, 'current').filter((c) => c.station === 'flat');
  // Three hours of the second day in which the flat's ADCP measured every ensemble over 3 bins or more (the
  // flow model learns from those only, forecast-step.ts).
  const poor = (c: (typeof flat)[number]) => c.flag === 4 || (c.bins_used as number) < 3;
  let gapStart = START_MS + 30 * HOUR;
  while (flat.some((c) => poor(c) && Math.abs(Date.parse(c.t) - gapStart - 1.5 * HOUR) <= 2 * HOUR))
    gapStart += HOUR;
  const gapEnd = gapStart + 3 * HOUR;
  const inGap = (m: SensorMessage) =>
    m.kind === 'adcp' && m.station === 'flat' && m.tMs >= gapStart && m.tMs < gapEnd;
  const limited = configOf(
    DEMO.replace('    current: flat\n', '    current: flat\n    modelled_flow_max_h: 1\n'),
  );
  const rs = run(limited, (m) => !inGap(m));
  const inside = (r: DerivedRecord) =>
    Date.parse(r.t) - W / 2 >= gapStart && Date.parse(r.t) + W / 2 <= gapEnd;
  const outer = of(rs, 'flux').filter((f) => f.transect === 'outer' && inside(f));
  const measured = of(base, 'flux').filter((f) => f.transect === 'outer' && inside(f));

  it('windows within the limit after the last ensemble: the model velocity, flag 3, note modelled_flow', () => {
    const early = outer.filter((f) => Date.parse(f.t) + W / 2 <= gapStart + HOUR);
    expect(early.length).toBeGreaterThanOrEqual(3);
    for (const f of early) {
      expect(String(f.notes)).toContain('modelled_flow');
      expect(f.flag).toBe(3);
      expect(f.ncp_mmol_m2_h).not.toBeNull();
      // The flow model stands in for the ADCP: within its scatter of what the ADCP measured there.
      const m = measured.find((x) => x.t === f.t)!;
      expect(Math.abs(Math.log(f.u_m_s! / m.u_m_s!))).toBeLessThan(0.35);
    }
  });

  it('beyond the configured hours the window has no current (input_missing), as without a model', () => {
    const late = outer.filter((f) => Date.parse(f.t) - W / 2 >= gapStart + 1.25 * HOUR);
    expect(late.length).toBeGreaterThanOrEqual(3);
    for (const f of late) {
      expect(f.valid).toBe(false);
      expect(f.flag).toBe(9);
      // The silent ADCP is stale by then (docs/methods/faults.md 12.7), and named.
      expect(f.invalid_reasons!.split(',').sort()).toEqual([
        'input_fault:flat/adcp-flat/stale',
        'input_missing',
      ]);
      expect(String(f.missing)).toContain('flat.current');
    }
  });

  it('a window on modelled flow is not invalidated by the silent ADCP it does not read', () => {
    const modelled = outer.filter((f) => String(f.notes).includes('modelled_flow'));
    expect(modelled.length).toBeGreaterThan(0);
    for (const f of modelled) expect(String(f.invalid_reasons ?? '')).not.toContain('adcp-flat');
    expect(modelled.some((f) => f.valid)).toBe(true);
  });

  it('the other transect, whose current station kept reporting, is not touched', () => {
    const a = of(rs, 'flux').filter((f) => f.transect === 'inner');
    const b = of(base, 'flux').filter((f) => f.transect === 'inner');
    expect(a.map((f) => JSON.stringify(f))).toEqual(b.map((f) => JSON.stringify(f)));
  });
});

describe('the demo with its scripted faults (two days, the lagoon event on the first night)', () => {
  const demo = simulateMessages(config, { startMs: Date.UTC(2026, 2, 1), durationMs: 48 * HOUR, seed: 7 });
  const p = createProcessor(config);
  const rs: DerivedRecord[] = [];
  for (const x of demo.messages) {
    const r = parseMessage(x.topic, JSON.stringify(x.payload));
    if (r.ok) rs.push(...p.push(r.message, x.tMs + 250).records);
  }
  rs.push(...p.drain());
  const event = demo.truth.find((t) => t.kind === 'event')!;

  it('warns of the event night only: an event does not teach the next night to expect another', () => {
    const warnings = of(rs, 'alert').filter((a) => a.rule === 'low_oxygen_expected' && a.state === 'raised');
    expect(warnings.length).toBe(1);
    expect(warnings[0]!.station).toBe('lagoon');
    expect(Math.abs(Date.parse(warnings[0]!.t) - Date.parse(event.t))).toBeLessThan(3 * HOUR);
    // The next night's lagoon forecasts stay near what the water did (above 4.5 mg/L all night).
    const next = of(rs, 'forecast').filter(
      (f) => f.station === 'lagoon' && Date.parse(f.t) > Date.parse(event.t) + 12 * HOUR,
    );
    expect(next.length).toBeGreaterThan(8);
    for (const f of next) expect(f.o2_min_mg_l!).toBeGreaterThan(4.5);
  });
});
