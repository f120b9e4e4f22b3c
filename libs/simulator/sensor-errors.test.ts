// Calibration errors built into simulated sensors: the same run with and without them differs only in the
// fields named, by exactly the error's formula; the truth is unchanged.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../contract/index.js';
import { simulateMessages } from './generate.js';

const parsed = parseConfigText(
  readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8'),
);
if (!parsed.ok) throw new Error('demo config invalid');
const config = parsed.config;
const START = Date.UTC(2026, 6, 14);
const opts = { startMs: START, durationMs: 6 * 3_600_000, seed: 4, faults: false };

describe('sensorErrors', () => {
  const clean = simulateMessages(config, opts);
  const bad = simulateMessages(config, {
    ...opts,
    sensorErrors: { 'back/co2-back': { offset: 12 }, 'flat/o2-flat': { gainDriftPerDay: -0.015 } },
  });

  it('changes only the named sensors, by offset and gain drift (days since the start)', () => {
    expect(bad.messages.length).toBe(clean.messages.length);
    let co2 = 0;
    let o2 = 0;
    bad.messages.forEach((m, i) => {
      const c = clean.messages[i]!;
      expect(m.topic).toBe(c.topic);
      if (m.topic.endsWith('/pco2/co2-back')) {
        co2++;
        expect(m.payload.pco2_uatm as number).toBeCloseTo((c.payload.pco2_uatm as number) + 12, 3);
        expect({ ...m.payload, pco2_uatm: 0 }).toEqual({ ...c.payload, pco2_uatm: 0 });
      } else if (m.topic.endsWith('/oxygen/o2-flat')) {
        o2++;
        const d = (m.tMs - START) / 86_400_000;
        expect(m.payload.o2_umol_l as number).toBeCloseTo(
          (c.payload.o2_umol_l as number) * (1 - 0.015 * d),
          3,
        );
      } else expect(m.payload).toEqual(c.payload);
    });
    expect(co2).toBe(36); // 6 h every 10 min
    expect(o2).toBe(72); // 6 h every 5 min
    expect(bad.truth).toEqual(clean.truth);
  });

  it('refuses an error on a field the message does not carry', () => {
    expect(() =>
      simulateMessages(config, { ...opts, sensorErrors: { 'back/co2-back': { field: 'sal', offset: 1 } } }),
    ).toThrow(/sensorErrors\.back\/co2-back: the pco2 message has no numeric field sal/);
  });
});
