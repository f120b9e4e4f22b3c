// The site's light sensor and the PAR of a flux window (light.ts; docs/methods/daily.md 10.8).
import { describe, expect, it } from 'vitest';
import { parseConfigText, type TransectConfig } from '../contract/index.js';
import { meanParUmolM2S, siteLightSensor, windowParUmolM2S } from './light.js';
import { createSeries, insert } from './series.js';

const tr = (kd?: number): TransectConfig =>
  ({
    upstream: 'a',
    downstream: 'b',
    current: 'b',
    length_m: 100,
    pq: 1,
    swap_on_reverse: false,
    min_speed_m_s: 0.02,
    max_angle_deg: 30,
    max_residence_min: 240,
    modelled_flow_max_h: 6,
    ...(kd !== undefined ? { kd_par_per_m: kd } : {}),
  }) as TransectConfig;

describe('the light beside the metabolism', () => {
  it('the site light sensor is the first enabled PAR sensor of the configuration', () => {
    const p = parseConfigText(`
site: s
reef_axis_deg: 270
stations:
  mast:
    sensors:
      spare: { kind: par, enabled: false }
      ctd: { kind: ctd }
  flat:
    sensors:
      under: { kind: par }
      top: { kind: par }
`);
    if (!p.ok) throw new Error(JSON.stringify(p.problems));
    expect(siteLightSensor(p.config)).toBe('flat/under');
  });

  it('window PAR: the mean of the samples, at the bed with an attenuation (Beer-Lambert, algebra)', () => {
    const s = createSeries();
    // One sample a minute, 900 to 1100 umol m-2 s-1 over a 30-min window (mean 1000), one flagged 4 (left out).
    for (let i = 0; i < 30; i++) insert(s, i * 60_000, 900 + (200 * i) / 29, 1);
    insert(s, 30 * 60_000 - 30_000, 5000, 4);
    const mean = meanParUmolM2S(s, 0, 30 * 60_000);
    expect(mean).toBeCloseTo(1000, 9);
    expect(windowParUmolM2S(tr(), mean, null)).toBe(1000);
    // kd 0.12 m-1 over 1.5 m: 1000 exp(-0.18) = 835.27
    expect(windowParUmolM2S(tr(0.12), mean, 1.5)).toBe(835.27);
    // An attenuation without a depth gives no bed PAR; no light data gives none.
    expect(windowParUmolM2S(tr(0.12), mean, null)).toBeNull();
    expect(windowParUmolM2S(tr(), null, 1.5)).toBeNull();
    // Fewer than half the expected samples: no mean.
    expect(meanParUmolM2S(s, 29 * 60_000, 59 * 60_000)).toBeNull();
  });
});
