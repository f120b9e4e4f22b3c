import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseConfigText, type ReefdConfig } from '../contract/index.js';
import { formatCalibrationYaml } from './format.js';
import { parseCalibrationText, type CalibrationEntry } from './schema.js';

const demo = parseConfigText(
  readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
);
if (!demo.ok) throw new Error('demo config invalid');
const config: ReefdConfig = demo.config;

describe('calibration file', () => {
  it('reads the contract shape with its defaults (slope 1, offsets and drifts 0)', () => {
    const r = parseCalibrationText(
      '- sensor: back/co2-back\n  field: pco2_uatm\n  from: 2026-07-14T00:00:00Z\n  to: 2026-07-20T00:00:00Z\n  offset: -12.0\n',
      config,
    );
    expect(r.ok).toBe(true);
    if (r.ok)
      expect(r.entries).toEqual([
        {
          sensor: 'back/co2-back',
          field: 'pco2_uatm',
          from: '2026-07-14T00:00:00Z',
          to: '2026-07-20T00:00:00Z',
          slope: 1,
          offset: -12,
          drift_per_day: 0,
          slope_drift_per_day: 0,
        },
      ]);
    const empty = parseCalibrationText('', config);
    expect(empty.ok && empty.entries).toEqual([]);
  });

  it('names each problem with its entry, key and line', () => {
    const text = [
      '- sensor: back/co2-back',
      '  field: pco2_uatm',
      '  offset: twelve',
      '- sensor: back',
      '  field: pco2_uatm',
      '- sensor: back/co2-back',
      '  field: pco2_uatm',
      '  from: 2026-07-20T00:00:00Z',
      '  to: 2026-07-14T00:00:00Z',
      '  gain: 2',
    ].join('\n');
    const r = parseCalibrationText(text, config);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const by = Object.fromEntries(r.problems.map((p) => [p.path, p]));
    expect(by['0.offset']?.line).toBe(3);
    expect(by['1.sensor']?.message).toMatch(/<station>\/<sensor>/);
    expect(by['2']?.message).toMatch(/unknown key\(s\) "gain"/);
  });

  it('checks sensors, fields and overlapping ranges against the configuration', () => {
    const r = parseCalibrationText(
      [
        '- { sensor: reef/co2, field: pco2_uatm }',
        '- { sensor: back/co2-x, field: pco2_uatm }',
        '- { sensor: back/co2-back, field: o2_umol_l }',
        '- { sensor: back/co2-back, field: pco2_uatm, to: 2026-07-16T00:00:00Z }',
        '- { sensor: back/co2-back, field: pco2_uatm, from: 2026-07-15T00:00:00Z }',
        '- { sensor: back/co2-back, field: temp_c, from: 2026-07-15T00:00:00Z }',
      ].join('\n'),
      config,
    );
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems.map((p) => `${p.path}: ${p.message}`)).toEqual([
      '0.sensor: station "reef" is not in the configuration',
      '1.sensor: station "back" has no sensor "co2-x"',
      '2.field: "o2_umol_l" is not a reading of a pco2 sensor (one of pco2_uatm, temp_c)',
      '4.from: overlaps entry 3 for back/co2-back pco2_uatm: give them separate from/to ranges',
    ]);
    expect(r.problems[4 - 1]?.line).toBe(5);
  });

  it('property: written entries read back equal (8 significant digits)', () => {
    const entry = fc.record({
      sensor: fc.constantFrom('back/co2-back', 'flat/o2-flat', 'crest/p-crest'),
      field: fc.constant('temp_c'),
      from: fc.option(
        fc.integer({ min: 1.7e12, max: 1.9e12 }).map((ms) => new Date(ms).toISOString()),
        { nil: undefined },
      ),
      slope: fc.double({ min: 0.5, max: 2, noNaN: true }),
      offset: fc.double({ min: -100, max: 100, noNaN: true }),
      drift_per_day: fc.double({ min: -5, max: 5, noNaN: true }),
      slope_drift_per_day: fc.double({ min: -0.1, max: 0.1, noNaN: true }),
    });
    fc.assert(
      fc.property(fc.uniqueArray(entry, { selector: (e) => e.sensor, maxLength: 3 }), (list) => {
        const entries = list.map((e) => {
          const { from, ...rest } = e;
          return (from === undefined ? rest : { ...rest, from }) as CalibrationEntry;
        });
        const text = formatCalibrationYaml(
          entries.map((e) => ({ entry: e, comments: ['fit: a # comment'] })),
          ['head'],
        );
        const r = parseCalibrationText(text, config);
        if (!r.ok) throw new Error(JSON.stringify(r.problems));
        expect(r.entries.length).toBe(entries.length);
        r.entries.forEach((got, i) => {
          const want = entries[i]!;
          expect(got.sensor).toBe(want.sensor);
          expect(got.from).toBe(want.from);
          for (const k of ['slope', 'offset', 'drift_per_day', 'slope_drift_per_day'] as const)
            expect(Math.abs(got[k] - want[k])).toBeLessThanOrEqual(Math.abs(want[k]) * 1e-7 + 1e-300);
        });
      }),
      { numRuns: 100 },
    );
  });
});
