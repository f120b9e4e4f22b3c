// Configuration (contract section 3): defaults, every cross-check, paths and line numbers of problems.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatProblem, parseConfigText } from './index.js';

const fixture = (name: string) =>
  readFileSync(new URL(`../../test/fixtures/config/${name}`, import.meta.url), 'utf8');
const demo = readFileSync(new URL('../../deploy/demo/ornen-reef.yaml', import.meta.url), 'utf8');

describe('valid configurations', () => {
  it('accepts the demo reef and fills the defaults', () => {
    const r = parseConfigText(demo);
    if (!r.ok) throw new Error(r.problems.map((p) => formatProblem(p)).join('\n'));
    expect(r.config.topic_prefix).toBe('reef');
    expect(r.config.processing.window_min).toBe(30);
    expect(r.config.processing.cadence_min).toBe(10);
    expect(r.config.processing.lateness_min).toBe(10);
    expect(r.config.transects.outer?.pq).toBe(1);
    expect(r.config.http.host).toBe('127.0.0.1');
    const adcp = r.config.stations.crest?.sensors['adcp-crest'];
    expect(adcp?.kind === 'adcp' && adcp.beam_angle_deg).toBe(25);
    expect(Object.isFrozen(r.config.stations)).toBe(true);
  });

  it('accepts a minimal file', () => {
    const r = parseConfigText(fixture('minimal.yaml'));
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.config.alkalinity).toEqual({ source: 'salinity', ta_s35_umol_kg: 2300 });
  });

  it('accepts the contract example shape, including the bearing_deg option', () => {
    const text = `site: demo-reef
topic_prefix: reef
reef_axis_deg: 270
stations:
  crest:
    sensors:
      p1:   { kind: pressure, height_m: 0.20 }
      adcp: { kind: adcp, height_m: 0.35, beam_angle_deg: 25, orientation: up, declination_deg: 0 }
      ctd:  { kind: ctd }
      o2:   { kind: oxygen }
      co2:  { kind: pco2 }
  back:
    position: { lat: -1.5, lon: 120.25 }
    label: Back reef
    sensors:
      p1:   { kind: pressure, height_m: 0.20 }
      adcp: { kind: adcp, height_m: 0.35, beam_angle_deg: 25, orientation: up, declination_deg: 0 }
      ctd:  { kind: ctd }
      o2:   { kind: oxygen }
      co2:  { kind: pco2 }
  weather:
    sensors:
      met: { kind: met }
alkalinity:
  source: salinity
  ta_s35_umol_kg: 2300
transects:
  flat:
    upstream: crest
    downstream: back
    length_m: 350
    current: back
    pq: 1.0
    bearing_deg: 270
`;
    const r = parseConfigText(text);
    if (!r.ok) throw new Error(r.problems.map((p) => formatProblem(p)).join('\n'));
    expect(r.config.transects.flat?.bearing_deg).toBe(270);
  });
});

describe('invalid configurations: every problem with its path and line', () => {
  const r = parseConfigText(fixture('invalid.yaml'));
  const problems = r.ok ? [] : r.problems;
  const at = (path: string) => problems.find((p) => p.path === path);

  it.each([
    ['site', 2],
    ['reef_axis_deg', 3],
    ['stations.crest.sensors.p1.height_m', 7],
    ['stations.crest.sensors.adcp.beam_angel_deg', 8],
    ['stations.crest.sensors.x9.kind', 11],
    ['outputs.influx.token', 24],
  ] as const)('%s', (path, line) => {
    const p = at(path);
    expect(p, `expected a problem at ${path}; got ${problems.map((q) => q.path).join(', ')}`).toBeDefined();
    // lines: the fixture's first line is a comment
    expect(p?.line).toBe(line);
  });

  it('explains an inline secret', () => {
    expect(at('outputs.influx.token')?.message).toMatch(/env: NAME/);
  });

  it('names a missing station in a transect (cross-checks run once the shape is valid)', () => {
    const text = fixture('invalid.yaml')
      .replace('site: demo reef', 'site: demo-reef')
      .replace('reef_axis_deg: 400', 'reef_axis_deg: 270')
      .replace('height_m: -0.2', 'height_m: 0.2')
      .replace(', beam_angel_deg: 25', '')
      .replace('      x9: { kind: turbidity }\n', '')
      .replace(', token: "inline-secret"', ', token: { env: REEFD_DB_TOKEN }');
    const r2 = parseConfigText(text);
    expect(r2.ok).toBe(false);
    const paths = r2.ok ? [] : r2.problems.map((p) => `${p.path}: ${p.message}`);
    expect(paths).toContainEqual(
      expect.stringMatching(/^transects\.flat\.downstream: names station "lagoon"/),
    );
    expect(paths).toContainEqual(
      expect.stringMatching(/^transects\.flat\.current: station "back" has no adcp/),
    );
    expect(paths).toContainEqual(
      expect.stringMatching(
        /^transects\.flat\.upstream: station "crest" has no pressure|^alkalinity\.source/,
      ),
    );
    expect(paths).toContainEqual(
      expect.stringMatching(/^alkalinity\.source: is "samples" but no station has a sample sensor/),
    );
  });

  it('reports YAML syntax errors with a line', () => {
    const r3 = parseConfigText('site: a\nstations: {\n  crest: [\n');
    expect(r3.ok).toBe(false);
    expect(!r3.ok && r3.problems[0]?.line).toBeGreaterThan(0);
  });

  it('rejects duplicate keys', () => {
    const r4 = parseConfigText('site: a\nsite: b\nreef_axis_deg: 1\nstations: {}\n');
    expect(r4.ok).toBe(false);
  });

  it('formats a problem as path: message (line N)', () => {
    expect(formatProblem({ path: 'a.b', message: 'is required', line: 4 })).toBe('a.b: is required (line 4)');
  });
});

describe('plausibility and one home for each default', () => {
  const base = `site: s
reef_axis_deg: 270
stations:
  crest:
    sensors:
`;
  const problemsOf = (text: string) => {
    const r = parseConfigText(text);
    return r.ok ? [] : r.problems.map((p) => `${p.path}: ${p.message}`);
  };

  it('refuses a pressure sensor 50 m above the bed (a depth written as a height)', () => {
    expect(problemsOf(`${base}      p1: { kind: pressure, height_m: 50 }\n`)).toEqual([
      'stations.crest.sensors.p1.height_m: is the height above the bed, at most 10 m on a reef frame (not the water depth)',
    ]);
    expect(problemsOf(`${base}      p1: { kind: pressure, height_m: 0.4 }\n`)).toEqual([]);
  });

  it('refuses an upward-looking ADCP 30 m up, accepts a downward-looking one there', () => {
    expect(problemsOf(`${base}      a1: { kind: adcp, height_m: 30 }\n`)).toEqual([
      'stations.crest.sensors.a1.height_m: is the height above the bed of an upward-looking ADCP, at most 10 m on a reef frame (not the water depth)',
    ]);
    expect(problemsOf(`${base}      a1: { kind: adcp, height_m: 30, orientation: down }\n`)).toEqual([]);
  });

  it('refuses a low-oxygen limit in the wrong unit and a misspelt alert metric', () => {
    const p = problemsOf(
      `${base}      o1: { kind: oxygen }\nalerts:\n  low_oxygen: { below: 62.5, clear: 70 }\n  rules:\n    warm: { metric: ctd.temperature, above: 31 }\n`,
    );
    expect(p.map((x) => x.split(':')[0])).toEqual([
      'alerts.low_oxygen.below',
      'alerts.low_oxygen.clear',
      'alerts.rules.warm.metric',
    ]);
  });

  it('fills the alerts, notify and dead-letter defaults without those sections; data_dir has none here', () => {
    const r = parseConfigText(`${base}      c1: { kind: ctd }\n`);
    if (!r.ok) throw new Error(r.problems.map((x) => formatProblem(x)).join('\n'));
    expect(r.config.alerts.silence_min).toBe(15);
    expect(r.config.alerts.low_oxygen.below).toBe(2);
    expect(Object.keys(r.config.notify.channels)).toEqual(['dashboard']);
    expect(r.config.outputs.dead_letter.max_per_min).toBe(600);
    // Where the data folder is depends on where reefd runs (services/config/load.ts resolveDataDir).
    expect(r.config.data_dir).toBeUndefined();
  });
});
