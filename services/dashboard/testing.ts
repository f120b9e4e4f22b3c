// Test support (kept out of the build, see tsconfig.build.json): a small JSON Schema (2020-12) checker for the
// keywords the dashboard's OpenAPI document uses, so a test can hold every live answer against the published
// document itself (not against the zod schemas it was generated from, which would prove nothing about the
// document). Unknown keywords fail loudly.
type Schema = Record<string, unknown> | boolean;

const KNOWN = new Set([
  '$ref',
  'type',
  'const',
  'enum',
  'properties',
  'required',
  'additionalProperties',
  'propertyNames',
  'items',
  'prefixItems',
  'minItems',
  'maxItems',
  'oneOf',
  'anyOf',
  'allOf',
  'minimum',
  'maximum',
  'exclusiveMinimum',
  'exclusiveMaximum',
  'minLength',
  'maxLength',
  'pattern',
  'format',
  'description',
  'default',
  'title',
  'id',
]);

function typeOf(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'array';
  if (typeof v === 'number') return Number.isInteger(v) ? 'integer' : 'number';
  return typeof v;
}

/** Problems of `value` against `schema` (empty: valid). `root` resolves `#/...` references. */
export function checkSchema(
  value: unknown,
  schema: Schema,
  root: Record<string, unknown>,
  at = '$',
): string[] {
  if (schema === true) return [];
  if (schema === false) return [`${at}: nothing is allowed here`];
  const out: string[] = [];
  for (const k of Object.keys(schema))
    if (!KNOWN.has(k)) out.push(`${at}: schema keyword ${k} not supported`);
  if (typeof schema.$ref === 'string') {
    const target = schema.$ref
      .replace(/^#\//, '')
      .split('/')
      .reduce<unknown>((o, key) => (o as Record<string, unknown> | undefined)?.[key], root);
    if (target === undefined) return [`${at}: unresolved reference ${schema.$ref}`];
    out.push(...checkSchema(value, target as Schema, root, at));
  }
  const t = typeOf(value);
  if (schema.type !== undefined) {
    const types = Array.isArray(schema.type) ? (schema.type as string[]) : [schema.type as string];
    if (!types.some((x) => x === t || (x === 'number' && t === 'integer')))
      return [...out, `${at}: ${t} where ${types.join('|')} is expected`];
  }
  if ('const' in schema && value !== schema.const)
    out.push(`${at}: ${JSON.stringify(value)} is not ${JSON.stringify(schema.const)}`);
  if (Array.isArray(schema.enum) && !schema.enum.includes(value))
    out.push(`${at}: ${JSON.stringify(value)} is not one of the enum`);
  if (t === 'object' && value !== null) {
    const obj = value as Record<string, unknown>;
    const props = (schema.properties ?? {}) as Record<string, Schema>;
    for (const r of (schema.required ?? []) as string[]) if (!(r in obj)) out.push(`${at}: missing ${r}`);
    for (const [k, v] of Object.entries(obj)) {
      if (k in props) out.push(...checkSchema(v, props[k] as Schema, root, `${at}.${k}`));
      else if (schema.additionalProperties !== undefined)
        out.push(...checkSchema(v, schema.additionalProperties as Schema, root, `${at}.${k}`));
      if (schema.propertyNames !== undefined)
        out.push(...checkSchema(k, schema.propertyNames as Schema, root, `${at}{${k}}`));
    }
  }
  if (t === 'array') {
    const arr = value as unknown[];
    const prefix = (schema.prefixItems ?? []) as Schema[];
    arr.forEach((v, i) => {
      if (i < prefix.length) out.push(...checkSchema(v, prefix[i] as Schema, root, `${at}[${i}]`));
      else if (schema.items !== undefined)
        out.push(...checkSchema(v, schema.items as Schema, root, `${at}[${i}]`));
    });
    if (typeof schema.minItems === 'number' && arr.length < schema.minItems)
      out.push(`${at}: fewer than ${schema.minItems} items`);
    if (typeof schema.maxItems === 'number' && arr.length > schema.maxItems)
      out.push(`${at}: more than ${schema.maxItems} items`);
  }
  if (t === 'number' || t === 'integer') {
    const n = value as number;
    if (typeof schema.minimum === 'number' && n < schema.minimum) out.push(`${at}: ${n} < ${schema.minimum}`);
    if (typeof schema.maximum === 'number' && n > schema.maximum) out.push(`${at}: ${n} > ${schema.maximum}`);
    if (typeof schema.exclusiveMinimum === 'number' && n <= schema.exclusiveMinimum)
      out.push(`${at}: ${n} <= ${schema.exclusiveMinimum}`);
    if (typeof schema.exclusiveMaximum === 'number' && n >= schema.exclusiveMaximum)
      out.push(`${at}: ${n} >= ${schema.exclusiveMaximum}`);
  }
  if (t === 'string') {
    const s = value as string;
    if (typeof schema.minLength === 'number' && s.length < schema.minLength)
      out.push(`${at}: shorter than ${schema.minLength}`);
    if (typeof schema.maxLength === 'number' && s.length > schema.maxLength)
      out.push(`${at}: longer than ${schema.maxLength}`);
    if (typeof schema.pattern === 'string' && !new RegExp(schema.pattern, 'u').test(s))
      out.push(`${at}: does not match ${schema.pattern}`);
  }
  if (Array.isArray(schema.allOf))
    for (const s of schema.allOf as Schema[]) out.push(...checkSchema(value, s, root, at));
  if (
    Array.isArray(schema.anyOf) &&
    !(schema.anyOf as Schema[]).some((s) => checkSchema(value, s, root, at).length === 0)
  )
    out.push(`${at}: matches none of anyOf`);
  if (Array.isArray(schema.oneOf)) {
    const n = (schema.oneOf as Schema[]).filter((s) => checkSchema(value, s, root, at).length === 0).length;
    if (n !== 1) out.push(`${at}: matches ${n} of oneOf, not exactly one`);
  }
  return out;
}
