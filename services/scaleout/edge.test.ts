import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseConfigText, parseMessage, type SensorMessage } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import { createBridgeProcessor } from './bridge-processor.js';
import { rawRecordOf } from './edge-bridge.js';

const DEMO = path.resolve(import.meta.dirname, '../../deploy/demo/ornen-reef.yaml');

async function demo(extra: string) {
  const r = parseConfigText(`${await readFile(DEMO, 'utf8')}\n${extra}`);
  if (!r.ok) throw new Error(JSON.stringify(r.problems));
  return r.config;
}

function ctd(seq: number): SensorMessage {
  const payload = { v: 1, t: `2026-11-20T00:0${seq}:00Z`, seq, temp_c: 27.5, sal: 35.1 };
  const r = parseMessage('reef/ornen-reef/crest/ctd/ctd-crest', JSON.stringify(payload));
  if (!r.ok) throw new Error(r.reason);
  return r.message;
}

describe('edge mode', () => {
  it('reads the bridge section with its defaults and refuses unknown keys', async () => {
    const cfg = await demo('bridge:\n  kafka: { brokers: [127.0.0.1:19092], topic: reef.raw }\n');
    expect(cfg.bridge?.kafka.partition_by).toBe('site');
    expect(cfg.bridge?.derive).toBe(false);
    expect(cfg.bridge?.kafka.client_id).toBe('reefd');
    const bad = parseConfigText(
      `${await readFile(DEMO, 'utf8')}\nbridge:\n  kafka: { brokers: [b:1], topic: t, key_by: x }\n`,
    );
    expect(bad.ok).toBe(false);
  });

  it('forwards the contract record: key site/station/sensor, value payload plus the four ids', () => {
    // docs/contract-v1.md section 1: key `<site>/<station>/<sensor>`, value = payload + site, station, kind, sensor.
    const { key, value } = rawRecordOf(ctd(1));
    expect(key).toBe('ornen-reef/crest/ctd-crest');
    expect(JSON.parse(value)).toEqual({
      v: 1,
      t: '2026-11-20T00:01:00Z',
      seq: 1,
      temp_c: 27.5,
      sal: 35.1,
      site: 'ornen-reef',
      station: 'crest',
      kind: 'ctd',
      sensor: 'ctd-crest',
    });
    // The value parses back to the same message (what the shore consumer does).
    const back = parseMessage('reef/ornen-reef/crest/ctd/ctd-crest', value);
    expect(back.ok && back.message).toEqual(ctd(1));
  });

  it('derives nothing by default, forwards every pushed message, and keeps the health table', async () => {
    const cfg = await demo('');
    const sent: string[] = [];
    const p = createBridgeProcessor(cfg, (m) => sent.push(`${m.sensor}:${m.tMs}`));
    for (const s of [1, 2, 3]) expect(p.push(ctd(s), Date.UTC(2026, 10, 20, 1)).records).toEqual([]);
    expect(sent).toEqual([1, 2, 3].map((s) => `ctd-crest:${Date.UTC(2026, 10, 20, 0, s)}`));
    expect(p.watermarkMs()).toBe(Date.UTC(2026, 10, 20, 0, 3));
    expect(p.sensorHealth().map((h) => h.sensor)).toEqual(['ctd-crest']);
    // The snapshot is a processor state a later run with derivations can start from.
    expect(() => createProcessor(cfg, p.snapshot())).not.toThrow();
  });

  it('with derive on, the real processor runs behind the forwarding', async () => {
    const cfg = await demo('');
    let n = 0;
    const p = createBridgeProcessor(cfg, () => n++, createProcessor(cfg));
    p.push(ctd(1), Date.UTC(2026, 10, 20, 1));
    expect(n).toBe(1);
    expect(p.push(ctd(1), Date.UTC(2026, 10, 20, 1)).status).toBe('duplicate');
    expect(n).toBe(2);
  });
});
