// Proof that the performance work leaves the records alone: `reefd replay` of one simulated demo archive,
// run from an earlier revision of the sources and from the working tree, must write the same bytes.
//
//   npx tsx test/bench/replay-identity.ts [REV] [--hours H] [--seed N] [--keep]
//
// REV (default: the merge base of HEAD and main) is extracted with `git archive` into a temporary folder and
// run from its own sources (tsx, the same node_modules); nothing in the repository is touched.
// The archive is the demo site (deploy/demo/ornen-reef.yaml), H simulated hours (default 72, faults and the
// low-oxygen night included), received 150 ms after each send, in daily files, written twice:
//   A: every line as the daemon wrote it before (payload parsed and re-serialised: archiveLine);
//   B: every line spliced from the payload bytes (archiveLineBytes), the payload sent pretty-printed with
//      CR LF line ends and a byte order mark, as a sensor might format it, so the splice path is exercised.
// Every 40th message is followed by a faulty copy (a value out of range, a wrong type, a missing field, a
// NaN-like string, an unknown field), so rejections go through both validation paths too.
// Checks: replay(REV, A) == replay(HEAD, A) == replay(HEAD, B), byte for byte, and the same rejections by
// reason; exit 1 otherwise.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import {
  mkdirSync,
  mkdtempSync,
  readFileSync,
  realpathSync,
  rmSync,
  symlinkSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { archiveLine } from '../../libs/contract/index.js';
import { simulateMessages } from '../../libs/simulator/index.js';
import { archiveLineBytes, dayOf, plainName } from '../../services/archive/index.js';
import { demoYaml, parsedConfig } from '../e2e/helpers/reefd.js';

const repo = fileURLToPath(new URL('../..', import.meta.url));
const { values, positionals } = parseArgs({
  allowPositionals: true,
  options: {
    hours: { type: 'string', default: '72' },
    seed: { type: 'string', default: '11' },
    keep: { type: 'boolean', default: false },
  },
});
const git = (...args: string[]) => execFileSync('git', args, { cwd: repo, encoding: 'utf8' }).trim();
const rev = positionals[0] ?? git('merge-base', 'HEAD', 'main');
const hours = Number(values.hours);
const work = mkdtempSync(path.join(tmpdir(), 'reefd-replay-identity-'));
console.log(`comparing replay at ${rev} (${git('log', '-1', '--format=%h %s', rev).slice(0, 90)})`);
console.log(`with the working tree at ${git('log', '-1', '--format=%h', 'HEAD')}; work folder ${work}`);

// 1. The archive, twice.
const config = parsedConfig(demoYaml());
const startMs = Date.UTC(2026, 10, 2);
const sim = simulateMessages(config, { startMs, durationMs: hours * 3_600_000, seed: Number(values.seed) });
const BOM = Buffer.from([0xef, 0xbb, 0xbf]);
const files = { A: new Map<string, string[]>(), B: new Map<string, Buffer[]>() };
const faults: ((p: Record<string, unknown>) => void)[] = [
  (p) => (p.temp_c = 99),
  (p) => (p.v = '1'),
  (p) => delete p.t,
  (p) => (p.battery_v = 'NaN'),
  (p) => (p.t = '2026-02-30T00:00:00Z'),
];
const messages = sim.messages.flatMap((m, i) => {
  if (i % 40 !== 39) return [m];
  const bad = structuredClone(m.payload);
  faults[((i / 40) % faults.length) | 0]!(bad);
  return [m, { ...m, payload: bad }];
});
for (const m of messages) {
  const rxMs = m.tMs + 150;
  const name = plainName(dayOf(rxMs));
  const canonical = JSON.stringify(m.payload);
  const a = files.A.get(name) ?? [];
  a.push(archiveLine(m.topic, new Date(rxMs).toISOString(), canonical));
  files.A.set(name, a);
  const sent = Buffer.concat([BOM, Buffer.from(JSON.stringify(m.payload, null, 1).replace(/\n/g, '\r\n'))]);
  const b = files.B.get(name) ?? [];
  b.push(archiveLineBytes({ topic: m.topic, rxMs, payload: sent, json: true }), Buffer.from('\n'));
  files.B.set(name, b);
}
for (const [tag, byName] of Object.entries(files)) {
  mkdirSync(path.join(work, tag));
  for (const [name, lines] of byName) {
    const data = tag === 'A' ? (lines as string[]).join('\n') + '\n' : Buffer.concat(lines as Buffer[]);
    writeFileSync(path.join(work, tag, name), data);
  }
}
console.log(`archive: ${messages.length} messages over ${hours} h in ${files.A.size} daily files`);

// 2. The earlier sources, from git, beside the same node_modules.
const before = path.join(work, 'before');
mkdirSync(before);
execFileSync('sh', ['-c', `git archive ${rev} | tar -x -C "${before}"`], { cwd: repo });
symlinkSync(realpathSync(path.join(repo, 'node_modules')), path.join(before, 'node_modules'));

interface Replayed {
  sha: string;
  bytes: number;
  lines: number;
  rejects: string;
}

function replay(tree: string, archive: string, out: string): Replayed {
  const r = spawnSync(
    process.execPath,
    [
      '--import',
      'tsx',
      path.join(tree, 'test/e2e/helpers/cli.ts'),
      'replay',
      '--config',
      path.join(tree, 'deploy/demo/ornen-reef.yaml'),
      '--input',
      archive,
      '--out',
      out,
      '--summary-json',
      `${out}.summary.json`,
    ],
    { cwd: tree, encoding: 'utf8' },
  );
  if (r.status !== 0) throw new Error(`replay in ${tree} failed (${r.status}): ${r.stderr}`);
  const text = readFileSync(out);
  console.log(`  ${path.basename(out)}: ${r.stderr.trim().split('\n').pop() ?? ''}`);
  const summary = JSON.parse(readFileSync(`${out}.summary.json`, 'utf8')) as {
    rejectsByReason: Record<string, number>;
  };
  return {
    sha: createHash('sha256').update(text).digest('hex'),
    bytes: text.length,
    lines: text.toString('utf8').split('\n').length - 1,
    rejects: JSON.stringify(Object.entries(summary.rejectsByReason).sort()),
  };
}

const results = {
  'before, archive A': replay(before, path.join(work, 'A'), path.join(work, 'before-A.ndjson')),
  'after, archive A': replay(repo, path.join(work, 'A'), path.join(work, 'after-A.ndjson')),
  'after, archive B (spliced)': replay(repo, path.join(work, 'B'), path.join(work, 'after-B.ndjson')),
};
const ref = results['before, archive A'];
let same = true;
for (const [label, r] of Object.entries(results)) {
  const ok = r.sha === ref.sha && r.bytes === ref.bytes && r.rejects === ref.rejects;
  same &&= ok;
  console.log(
    `${label.padEnd(28)} ${r.lines} records, ${r.bytes} bytes, sha256 ${r.sha.slice(0, 16)}, rejected ${r.rejects}: ${ok ? 'identical' : 'DIFFERENT'}`,
  );
}
if (ref.lines < 100) {
  console.log('too few records to prove anything');
  same = false;
}
if (!values.keep) rmSync(work, { recursive: true, force: true });
console.log(same ? 'records byte-identical' : 'records DIFFER');
process.exit(same ? 0 : 1);
