// The calibration file and the field logbook inside the processor (docs/methods/calibration.md 13.2, 13.6):
// corrected messages derive as if the sensor had read the corrected value, records built from them say
// `calibrated: true`, the raw message is untouched, the calibration state is in the checkpoint; an excluded
// sensor or station is faulty (`logbook_exclusion`, faults.ts): its records are flagged 4 with the reason, and
// flux windows with an excluded input are not valid. Eight hours of the fictional reef's inner transect
// (libs/simulator, no scripted faults).
import { describe, expect, it } from 'vitest';
import { compileCalibration, parseCalibrationText } from '../calibration/index.js';
import {
  parseConfigText,
  parseMessage,
  type DerivedRecord,
  type ReefdConfig,
  type SensorMessage,
} from '../contract/index.js';
import { parseLogbookText } from '../logbook/index.js';
import { simulateMessages } from '../simulator/index.js';
import { createProcessor, type ProcessorOptions, type ProcessorState } from './index.js';

const parsed = parseConfigText(`site: ornen-reef
reef_axis_deg: 270
latitude_deg: 8.01
stations:
  flat:
    sensors:
      p-flat: { kind: pressure, height_m: 0.15 }
      ctd-flat: { kind: ctd }
      o2-flat: { kind: oxygen }
      co2-flat: { kind: pco2 }
  back:
    sensors:
      p-back: { kind: pressure, height_m: 0.15 }
      adcp-back: { kind: adcp, height_m: 0.30, beam_angle_deg: 25, orientation: up, declination_deg: 10.5 }
      ctd-back: { kind: ctd }
      o2-back: { kind: oxygen }
      co2-back: { kind: pco2 }
  mast:
    sensors:
      met: { kind: met, wind_height_m: 6 }
transects:
  inner: { upstream: flat, downstream: back, length_m: 170, current: back }
`);
if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
const config: ReefdConfig = parsed.config;
const HOUR = 3_600_000;
const START = Date.UTC(2026, 6, 14);
const messages: { message: SensorMessage; rxMs: number }[] = simulateMessages(config, {
  startMs: START,
  durationMs: 8 * HOUR,
  seed: 3,
  faults: false,
}).messages.map((m) => {
  const r = parseMessage(m.topic, JSON.stringify(m.payload));
  if (!r.ok) throw new Error(r.reason);
  return { message: r.message, rxMs: m.tMs + 250 };
});

function run(
  options: ProcessorOptions,
  list = messages,
  restartAt = Infinity,
): { records: DerivedRecord[]; state: ProcessorState } {
  let p = createProcessor(config, undefined, options);
  const records: DerivedRecord[] = [];
  list.forEach((d, i) => {
    if (i === restartAt) p = createProcessor(config, JSON.parse(JSON.stringify(p.snapshot())), options);
    records.push(...p.push(d.message, d.rxMs).records);
  });
  records.push(...p.drain());
  return { records, state: p.snapshot() };
}

function calibration(yaml: string): ProcessorOptions {
  const r = parseCalibrationText(yaml, config);
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return { calibration: compileCalibration(r.entries) };
}

function logbook(yaml: string): ProcessorOptions {
  const r = parseLogbookText(yaml, config);
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return { logbook: r.entries };
}

const of = (rs: DerivedRecord[], type: string, sensor?: string) =>
  rs.filter((r) => r.type === type && (sensor === undefined || r.sensor === sensor));
const without = (r: DerivedRecord, ...keys: string[]) =>
  JSON.stringify(Object.fromEntries(Object.entries(r).filter(([k]) => !keys.includes(k))));

describe('calibration file in the processor', () => {
  const plain = run({});

  it('derives a corrected sensor as if it had read the corrected values, and marks its records', () => {
    const cal = run(calibration('- { sensor: back/co2-back, field: pco2_uatm, offset: -12 }\n'));
    // The same messages with the correction done by hand, through a processor without calibration.
    const byHand = run(
      {},
      messages.map((d) =>
        d.message.kind === 'pco2' && d.message.sensor === 'co2-back'
          ? { ...d, message: { ...d.message, pco2_uatm: d.message.pco2_uatm - 12 } }
          : d,
      ),
    );
    const a = of(cal.records, 'carbonate', 'co2-back');
    const b = of(byHand.records, 'carbonate', 'co2-back');
    expect(a.length).toBeGreaterThan(40);
    expect(a.map((r) => without(r, 'calibrated'))).toEqual(b.map((r) => without(r, 'calibrated')));
    expect(a.every((r) => r.calibrated === true)).toBe(true);
    // and the reading moved by about the offset (at the CTD's temperature)
    const raw = of(plain.records, 'carbonate', 'co2-back');
    const shift = (a[10]?.pco2_uatm as number) - (raw[10]?.pco2_uatm as number);
    expect(shift).toBeGreaterThan(-12.5);
    expect(shift).toBeLessThan(-11.5);
  });

  it('marks records built from a corrected input, and only those', () => {
    const cal = run(calibration('- { sensor: back/ctd-back, field: temp_c, offset: 0.05 }\n'));
    // carbonate and oxygen records of the back reef read its CTD: calibrated; the flat's do not
    expect(of(cal.records, 'carbonate', 'co2-back').every((r) => r.calibrated === true)).toBe(true);
    expect(of(cal.records, 'oxygen', 'o2-back').every((r) => r.calibrated === true)).toBe(true);
    expect(of(cal.records, 'carbonate', 'co2-flat').some((r) => r.calibrated !== undefined)).toBe(false);
    expect(of(cal.records, 'waves', 'p-flat').some((r) => r.calibrated !== undefined)).toBe(false);
    const flux = of(cal.records, 'flux');
    expect(flux.length).toBeGreaterThan(30);
    expect(flux.every((r) => r.calibrated === true)).toBe(true);
    expect(of(plain.records, 'flux').some((r) => r.calibrated !== undefined)).toBe(false);
  });

  it('applies a correction only inside its from/to range', () => {
    const from = new Date(START + 3 * HOUR).toISOString();
    const to = new Date(START + 5 * HOUR).toISOString();
    const cal = run(
      calibration(`- { sensor: flat/o2-flat, field: o2_umol_l, from: ${from}, to: ${to}, slope: 1.1 }\n`),
    );
    const recs = of(cal.records, 'oxygen', 'o2-flat');
    const raw = new Map(of(plain.records, 'oxygen', 'o2-flat').map((r) => [r.t, r]));
    let inside = 0;
    for (const r of recs) {
      const ratio = (r.o2_umol_kg as number) / (raw.get(r.t)?.o2_umol_kg as number);
      if (r.t >= from && r.t < to) {
        inside++;
        expect(ratio).toBeCloseTo(1.1, 9);
        expect(r.calibrated).toBe(true);
      } else {
        expect(ratio).toBe(1);
        expect(r.calibrated).toBeUndefined();
      }
    }
    expect(inside).toBe(24); // 2 h at 5 min
  });

  it('leaves the raw message unchanged', () => {
    const m = messages.find((d) => d.message.kind === 'pco2' && d.message.sensor === 'co2-back');
    const before = JSON.stringify(m);
    run(calibration('- { sensor: back/co2-back, field: pco2_uatm, offset: -12 }\n'), messages.slice(0, 400));
    expect(JSON.stringify(m)).toBe(before);
  });

  it('keeps the calibration state in the checkpoint: a drift without `from` continues after a restart', () => {
    const opts = calibration('- { sensor: flat/co2-flat, field: pco2_uatm, drift_per_day: -24 }\n');
    const whole = run(opts);
    const restarted = run(opts, messages, Math.floor(messages.length / 2));
    const first = messages.find((d) => d.message.sensor === 'co2-flat')?.message.tMs;
    expect(whole.state.reprocess.calibration.firstMs['flat/co2-flat']).toBe(first);
    expect(restarted.state.reprocess.calibration.firstMs['flat/co2-flat']).toBe(first);
    const key = (rs: DerivedRecord[]) => of(rs, 'carbonate', 'co2-flat').map((r) => JSON.stringify(r));
    expect(key(restarted.records)).toEqual(key(whole.records));
    // 8 h at -24 uatm/day: the last reading corrected by about -8 uatm
    const last = (rs: DerivedRecord[]) => of(rs, 'carbonate', 'co2-flat').at(-1)?.pco2_uatm as number;
    expect(last(whole.records) - last(plain.records)).toBeLessThan(-7);
    expect(last(whole.records) - last(plain.records)).toBeGreaterThan(-8.5);
  });
});

describe('logbook exclusions in the processor', () => {
  const from = new Date(START + 3 * HOUR).toISOString();
  const to = new Date(START + 4 * HOUR).toISOString();
  const inside = (r: DerivedRecord) => r.t >= from && r.t < to;

  it('flags a sensor 4 with logbook_exclusion inside its exclusion, and its windows invalid', () => {
    const { records } = run(
      logbook(
        `- { t: ${from}, station: back, sensor: o2-back, event: cleaning, exclude_from: ${from}, exclude_to: ${to} }\n`,
      ),
    );
    const o2 = of(records, 'oxygen', 'o2-back');
    expect(o2.filter(inside).length).toBe(12);
    for (const r of o2) {
      if (inside(r)) {
        expect(r.flag).toBe(4);
        expect(r.invalid_reasons).toBe('input_fault:back/o2-back/logbook_exclusion');
      } else {
        expect(r.flag).toBeLessThan(4);
        expect(r.invalid_reasons).toBeUndefined();
      }
    }
    // other sensors of the station are not excluded
    expect(of(records, 'carbonate', 'co2-back').some((r) => r.flag === 4)).toBe(false);
    const reason = 'input_fault:back/o2-back/logbook_exclusion';
    const flux = of(records, 'flux');
    // a 30-min window [t - 15, t + 15) overlaps the exclusion when t is in (from - 15 min, to + 15 min)
    const overlaps = (r: DerivedRecord) =>
      Date.parse(r.t) + 15 * 60_000 > Date.parse(from) && Date.parse(r.t) - 15 * 60_000 < Date.parse(to);
    expect(flux.filter(overlaps).length).toBe(8); // centres 02:55 ... 04:05
    // Every window over the exclusion names it; none that ends before it or starts 30 min after it does (the
    // fault state decides the edge: the window just after may still see the sensor re-entering).
    const clear = (r: DerivedRecord) =>
      Date.parse(r.t) + 15 * 60_000 <= Date.parse(from) ||
      Date.parse(r.t) - 15 * 60_000 >= Date.parse(to) + 30 * 60_000;
    for (const r of flux) {
      const has = String(r.invalid_reasons ?? '')
        .split(',')
        .includes(reason);
      if (overlaps(r)) expect(has, r.t).toBe(true);
      if (clear(r)) expect(has, r.t).toBe(false);
      if (has) {
        expect(r.valid).toBe(false);
        expect(r.flag).toBeGreaterThanOrEqual(3);
      }
    }
    expect(flux.filter(clear).length).toBeGreaterThan(30);
  });

  it('a station-wide exclusion flags every sensor of the station and names each input', () => {
    const { records } = run(
      logbook(
        `- { t: ${from}, station: flat, event: relevel, text: frame moved, exclude_from: ${from}, exclude_to: ${to} }\n`,
      ),
    );
    for (const type of ['oxygen', 'waves', 'carbonate']) {
      const rs = records.filter((r) => r.type === type && r.station === 'flat' && inside(r));
      expect(rs.length, type).toBeGreaterThan(0);
      for (const r of rs) {
        expect(r.flag, type).toBe(4);
        expect(String(r.invalid_reasons), type).toMatch(
          /^input_fault:flat\/[a-z0-9-]+\/logbook_exclusion(,|$)/,
        );
      }
    }
    expect(records.some((r) => r.station === 'back' && r.type !== 'alert' && r.flag === 4)).toBe(false);
    const mid = of(records, 'flux').find(
      (r) => r.t === new Date(START + 3.5 * HOUR + 5 * 60_000).toISOString(),
    );
    expect(mid?.valid).toBe(false);
    expect(String(mid?.invalid_reasons)).toContain('input_fault:flat/o2-flat/logbook_exclusion');
    expect(String(mid?.invalid_reasons)).toContain('input_fault:flat/ctd-flat/logbook_exclusion');
    expect(String(mid?.invalid_reasons)).not.toContain('back/');
  });
});
