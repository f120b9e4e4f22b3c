import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../contract/index.js';
import { planFromConfig } from './plan.js';

const demo = (edit: (yaml: string) => string = (y) => y) => {
  const text = readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8');
  const r = parseConfigText(edit(text));
  if (!r.ok) throw new Error('demo config invalid');
  return r.config;
};

describe('forecast plan from the configuration', () => {
  it('the demo reef: crest by persistence, flat and back by their transects, the lagoon as a box fed by the back reef', () => {
    const p = planFromConfig(demo());
    expect(p.stations).toEqual([
      { station: 'crest', kind: 'persistence' },
      { station: 'flat', kind: 'transect', transect: 'outer' },
      { station: 'back', kind: 'transect', transect: 'inner' },
      { station: 'lagoon', kind: 'box', source: 'back', feed: 'inner' },
    ]);
    expect(p.offshoreStation).toBe('fore');
    expect(p.latDeg).toBe(8.01);
    expect(p.lonDeg).toBeCloseTo(-144.9318, 3);
    expect(p.transects.map((t) => t.bearingDeg)).toEqual([270, 270]);
  });

  it('without positions the offshore station is the first transect upstream with a pressure sensor', () => {
    const p = planFromConfig(demo((y) => y.replace(/^\s+position: \{[^}]*\}\n/gm, '')));
    expect(p.offshoreStation).toBe('crest');
    expect(Number.isNaN(p.lonDeg)).toBe(true);
    // The lagoon falls back to the last transect that has a forecast.
    expect(p.stations.at(-1)).toEqual({ station: 'lagoon', kind: 'box', source: 'back', feed: 'inner' });
  });
});
