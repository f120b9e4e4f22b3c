// Parses configuration text (YAML or JSON) and validates it, reporting each problem with its path and,
// where the YAML library knows it, the line. Pure: reading the file and resolving secrets is services/config.
import { LineCounter, parseDocument, isNode } from 'yaml';
import type { z } from 'zod';
import { configSchema, type ReefdConfig } from './config-schema.js';

export interface ConfigProblem {
  /** Dotted path inside the file, e.g. `stations.crest.sensors.p1.height_m`. */
  path: string;
  message: string;
  /** 1-based line in the file, when known. */
  line?: number;
}

export type ConfigParse = { ok: true; config: ReefdConfig } | { ok: false; problems: ConfigProblem[] };

function describe(issue: z.core.$ZodIssue): string {
  switch (issue.code) {
    case 'invalid_type':
      return issue.message.includes('received undefined') ? 'is required' : issue.message;
    case 'unrecognized_keys':
      return `unknown key${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `"${k}"`).join(', ')}`;
    default:
      return issue.message;
  }
}

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object' && !Object.isFrozen(value)) {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

export function parseConfigText(
  text: string,
  extraCheck?: (cfg: ReefdConfig) => ConfigProblem[],
): ConfigParse {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, prettyErrors: true, uniqueKeys: true });
  if (doc.errors.length > 0) {
    return {
      ok: false,
      problems: doc.errors.map((e) => {
        const p: ConfigProblem = { path: '(file)', message: e.message.split('\n')[0] ?? e.message };
        const pos = e.linePos?.[0];
        if (pos) p.line = pos.line;
        return p;
      }),
    };
  }
  const raw: unknown = doc.toJS({ maxAliasCount: 50 });
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    return { ok: false, problems: [{ path: '(file)', message: 'the configuration must be a YAML mapping' }] };
  }
  const lineOf = (path: readonly PropertyKey[]): number | undefined => {
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n) as unknown[], true);
      if (isNode(node) && node.range) return lineCounter.linePos(node.range[0]).line;
    }
    return undefined;
  };
  const result = configSchema.safeParse(raw);
  if (!result.success) {
    const problems = result.error.issues.map((issue) => {
      let path = issue.path;
      if (issue.code === 'unrecognized_keys' && issue.keys.length === 1)
        path = [...path, issue.keys[0] as string];
      const p: ConfigProblem = { path: path.map(String).join('.') || '(root)', message: describe(issue) };
      const line = lineOf(path);
      if (line !== undefined) p.line = line;
      return p;
    });
    return { ok: false, problems };
  }
  const extra = extraCheck?.(result.data) ?? [];
  if (extra.length > 0) {
    return {
      ok: false,
      problems: extra.map((p) => {
        const line = lineOf(p.path.split('.'));
        return line !== undefined && p.line === undefined ? { ...p, line } : p;
      }),
    };
  }
  return { ok: true, config: deepFreeze(result.data) };
}

export function formatProblem(p: ConfigProblem): string {
  return `${p.path}: ${p.message}${p.line !== undefined ? ` (line ${p.line})` : ''}`;
}
