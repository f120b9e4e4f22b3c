// Shared by the notifier tests (not a test file itself): a manual clock, timers that never fire (tests call
// tick()), alert records and a temporary folder.

import { mkdtemp } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { alertId, type AlertRecord } from '../../libs/alerts/index.js';
import type { Clock, Timers } from './notifier.js';

export const T0 = Date.UTC(2026, 5, 1, 12, 0, 0);

export function manualClock(startMs = T0): Clock & { ms: number; advance(ms: number): void } {
  const c = {
    ms: startMs,
    now: () => c.ms,
    advance: (ms: number) => {
      c.ms += ms;
    },
  };
  return c;
}

export const idleTimers: Timers = { set: () => null, clear: () => undefined };

export function tempDir(): Promise<string> {
  return mkdtemp(join(tmpdir(), 'reefd-notify-'));
}

export function alert(p: Partial<AlertRecord> & { rule: string; station: string }): AlertRecord {
  const t = p.t ?? new Date(T0).toISOString();
  return {
    type: 'alert',
    site: 'demo-reef',
    t,
    class: p.fault ? 'fault' : 'threshold',
    state: 'raised',
    value: 1,
    limit: 2,
    severity: 'warning',
    id: alertId(`${p.rule}/${p.station}/${p.sensor ?? ''}`, Date.parse(t)),
    ...p,
  };
}
