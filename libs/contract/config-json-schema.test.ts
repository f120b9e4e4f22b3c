// The configuration's JSON Schema: the committed copy equals what `reefd config schema` prints, the example
// site files pass it, and it refuses what the zod schema refuses that a schema can express. The validator is
// Ajv 6 (draft-07), an independent implementation of the standard.
import { readFileSync } from 'node:fs';
import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import { parse as parseYaml } from 'yaml';
import { configJsonSchema, parseConfigText } from './index.js';

const repo = (rel: string) => new URL(`../../${rel}`, import.meta.url);
const DEMO = 'deploy/demo/ornen-reef.yaml';
const schema = configJsonSchema();
const validate = new Ajv({ allErrors: true }).compile(schema);
const demoText = readFileSync(repo(DEMO), 'utf8');
const demo = parseYaml(demoText) as Record<string, unknown>;

const errorsOf = (doc: unknown) => {
  validate(doc);
  return (validate.errors ?? []).map((e) => `${e.dataPath} ${e.message ?? ''}`);
};

describe('configuration JSON Schema', () => {
  it('docs/reefd-config.schema.json is the schema `reefd config schema` prints', () => {
    const committed = JSON.parse(readFileSync(repo('docs/reefd-config.schema.json'), 'utf8')) as unknown;
    // Regenerate after a change of the configuration schema (docs/recipes/alert-rule.md, step 3):
    //   npx reefd config schema > docs/reefd-config.schema.json && npx prettier --write docs/reefd-config.schema.json
    expect(committed, 'docs/reefd-config.schema.json is stale: regenerate it (see this test)').toEqual(
      schema,
    );
    expect(schema.$schema).toBe('http://json-schema.org/draft-07/schema#');
  });

  it('the demo site file names the committed schema on its first line, for editors', () => {
    const first = demoText.split('\n')[0];
    expect(first).toBe('# yaml-language-server: $schema=../../docs/reefd-config.schema.json');
    const target = new URL(first!.split('$schema=')[1]!, repo(DEMO));
    expect(target.href).toBe(repo('docs/reefd-config.schema.json').href);
  });

  it('accepts the demo and the minimal site files, which config check accepts', () => {
    expect(parseConfigText(demoText).ok).toBe(true);
    expect(errorsOf(demo)).toEqual([]);
    const minimal = readFileSync(repo('test/fixtures/config/minimal.yaml'), 'utf8');
    expect(parseConfigText(minimal).ok).toBe(true);
    expect(errorsOf(parseYaml(minimal))).toEqual([]);
  });

  it('accepts secrets as references ({env} or {file}), the form the loader resolves', () => {
    const doc = structuredClone(demo);
    doc.http = { token: { env: 'REEFD_HTTP_TOKEN' } };
    expect(errorsOf(doc)).toEqual([]);
    doc.http = { token: { file: '/run/credentials/reefd.service/http-token' } };
    expect(errorsOf(doc)).toEqual([]);
  });

  it('refuses a misspelt key, a value out of range, an unknown sensor kind and the renamed k1k2', () => {
    const cases: [string, (d: Record<string, unknown>) => void, RegExp][] = [
      ['misspelt key', (d) => (d.reef_axis = 10), /should NOT have additional properties/],
      ['range', (d) => (d.reef_axis_deg = 400), /\.reef_axis_deg should be < 360/],
      ['site id', (d) => (d.site = 'ornen reef'), /\.site should match pattern/],
      ['kind', (d) => (d.stations = { s1: { sensors: { x: { kind: 'turbidity' } } } }), /stations/],
      ['k1k2', (d) => (d.carbonate = { k1k2: 'lueker2000' }), /\.carbonate\.k1k2 should NOT be valid/],
    ];
    for (const [what, mutate, want] of cases) {
      const doc = structuredClone(demo);
      mutate(doc);
      expect(parseConfigText(JSON.stringify(doc)).ok, what).toBe(false);
      expect(errorsOf(doc).join('\n'), what).toMatch(want);
    }
  });

  it('leaves out no top-level key of the configuration', () => {
    const props = Object.keys(schema.properties as object);
    for (const key of ['site', 'stations', 'transects', 'sources', 'outputs', 'alerts', 'notify', 'http'])
      expect(props).toContain(key);
    expect(schema.required).toEqual(['site', 'reef_axis_deg', 'stations']);
  });
});
