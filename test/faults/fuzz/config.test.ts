// Fuzzing the configuration loader (libs/contract parseConfigText) on random YAML-ish text and on mutated
// copies of the valid demo configuration.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { parse as parseYaml, stringify } from 'yaml';
import { describe, expect, it } from 'vitest';
import { REPO } from '../helpers/daemon.js';
import { fuzz, fuzzTimeoutMs } from './harness.js';
import { configProperty } from './properties.js';

const demoText = readFileSync(join(REPO, 'deploy/demo/ornen-reef.yaml'), 'utf8');
const demo = parseYaml(demoText) as Record<string, unknown>;

const token = fc.constantFrom(
  'site:',
  ' ',
  '  ',
  '\n',
  '- ',
  ': ',
  '{',
  '}',
  '[',
  ']',
  ',',
  '"',
  "'",
  '&a',
  '*a',
  '!!str',
  '!!binary',
  '<<: *a',
  '---',
  '...',
  '#',
  '|',
  '>',
  '?',
  'stations:',
  'sensors:',
  'kind: ctd',
  'height_m: -1',
  'reef_axis_deg: 270',
  'transects:',
  'upstream: crest',
  '~',
  'null',
  '1e400',
  '0x1F',
  '.nan',
  '.inf',
  'yes',
  '2026-12-01',
  'é',
  '\t',
);
const yamlish = fc.array(token, { maxLength: 60 }).map((t) => t.join(''));

type Json = unknown;
/** Paths into the demo object (arrays and objects). */
function paths(v: Json, prefix: string[] = [], out: string[][] = []): string[][] {
  out.push(prefix);
  if (v !== null && typeof v === 'object')
    for (const [k, c] of Object.entries(v as Record<string, unknown>)) paths(c, [...prefix, k], out);
  return out;
}
const allPaths = paths(demo).filter((p) => p.length > 0);

function mutate(path: string[], op: number, value: Json): string {
  const copy = structuredClone(demo) as Record<string, unknown>;
  let node: Record<string, unknown> = copy;
  for (const k of path.slice(0, -1)) node = node[k] as Record<string, unknown>;
  const last = path.at(-1) as string;
  if (op === 0) delete node[last];
  else if (op === 1) node[last] = value;
  else node[`${last}_x`] = value;
  return stringify(copy);
}

describe('fuzz: parseConfigText', () => {
  it('the demo configuration is valid (the mutations start from a valid file)', () => {
    const r = configPropertyResult(demoText);
    expect(r).toBe(true);
  });

  it(
    'never throws on random YAML-ish text',
    () => {
      fuzz('config', fc.oneof(yamlish, fc.string(), fc.string({ unit: 'binary' })), (t) => configProperty(t));
    },
    fuzzTimeoutMs(),
  );

  it(
    'never throws on mutated valid configurations, and names a path for each problem',
    () => {
      fuzz(
        'config',
        fc
          .tuple(fc.constantFrom(...allPaths), fc.integer({ min: 0, max: 2 }), fc.jsonValue({ maxDepth: 2 }))
          .map(([p, op, v]) => mutate(p, op, v)),
        configProperty,
      );
    },
    fuzzTimeoutMs(),
  );
});

function configPropertyResult(text: string): boolean {
  configProperty(text);
  return true;
}
