// The kind table: what the compiler refuses (each `@ts-expect-error` below fails `npm run typecheck` the day
// the refusal stops working) and what only a run can check (orders, QC variables, the series read).
import { describe, expect, it } from 'vitest';
import { KINDS } from '../../contract/index.js';
import { DEFAULT_QC_LIMITS } from '../../qc/index.js';
import { STATION_VARS, SITE_VARS } from '../state.js';
import { adcp } from './adcp.js';
import { ctd } from './ctd.js';
import { KIND_MODULES } from './index.js';
import { met } from './met.js';
import { oxygen } from './oxygen.js';
import { pco2 } from './pco2.js';
import { pressure } from './pressure.js';
import { sample } from './sample.js';
import { atSampleTime, defineKind, type KindTable } from './types.js';

describe('what the compiler refuses', () => {
  it('a table without a kind of the contract', () => {
    // @ts-expect-error Property 'par' is missing: every kind of libs/contract KINDS needs its module.
    const missing = { ctd, oxygen, pco2, pressure, adcp, met, sample } satisfies KindTable;
    expect(Object.keys(missing)).not.toContain('par');
  });

  it('a module filed under another kind', () => {
    // @ts-expect-error the met module cannot stand for par (its `kind` and its message type differ).
    const swapped = { ...KIND_MODULES, par: met } satisfies KindTable;
    expect(swapped.par.kind).toBe('met');
  });

  it('a module without one of its pieces', () => {
    // @ts-expect-error Property 'order' is missing.
    const noOrder = defineKind({
      kind: 'par',
      qcVariables: [],
      writes: { station: [], site: [] },
      reads: { station: [], site: [] },
      completeMs: atSampleTime,
      derive() {},
    });
    expect(noOrder.kind).toBe('par');
  });

  it('a derive that writes a series or checks a QC variable its module does not declare', () => {
    const m = defineKind({
      kind: 'ctd',
      order: 0,
      qcVariables: ['temp_c'],
      writes: { station: ['temp'], site: [] },
      reads: { station: [], site: [] },
      completeMs: atSampleTime,
      derive(msg, io) {
        // @ts-expect-error 'sal' is not among this module's QC variables.
        io.qc('ctd.sal', 'sal', msg.sal);
        // @ts-expect-error 'sal' is not among the series this module writes.
        io.put('sal', msg.tMs, msg.sal, 1);
        // @ts-expect-error no site series is declared.
        io.putSite('baro', msg.tMs, 1013, 1);
      },
    });
    expect(m.writes.station).toEqual(['temp']);
  });

  it('a message field of another kind', () => {
    const m = defineKind({
      kind: 'par',
      order: 5,
      qcVariables: [],
      writes: { station: [], site: [] },
      reads: { station: [], site: [] },
      completeMs: atSampleTime,
      derive(msg) {
        // @ts-expect-error a par message has no temp_c.
        void msg.temp_c;
      },
    });
    expect(m.kind).toBe('par');
  });
});

describe('the kind table', () => {
  // As plain lists of names, so one list can hold every module.
  const modules = Object.values(KIND_MODULES).map((m) => ({
    kind: m.kind as string,
    order: m.order,
    qcVariables: m.qcVariables as readonly string[],
    writes: { station: m.writes.station as readonly string[], site: m.writes.site as readonly string[] },
    reads: { station: m.reads.station as readonly string[], site: m.reads.site as readonly string[] },
  }));

  it('has one module per kind of the contract, under its own name', () => {
    expect(Object.keys(KIND_MODULES).sort()).toEqual([...KINDS].sort());
    for (const [k, m] of Object.entries(KIND_MODULES)) expect(m.kind).toBe(k);
  });

  it('gives every kind its own release order', () => {
    const orders = modules.map((m) => m.order);
    expect(new Set(orders).size).toBe(orders.length);
  });

  it('keeps the release order of the processor before the registry (partners first)', () => {
    // The order messages of one time were released in before the table existed (processor.ts KIND_ORDER):
    // the records depend on it, so it may only change with the replay-equivalence digest.
    const order = Object.fromEntries(modules.map((m) => [m.kind, m.order]));
    expect(order).toEqual({ ctd: 0, met: 1, pressure: 2, sample: 3, adcp: 4, par: 5, oxygen: 6, pco2: 7 });
  });

  it('names only QC variables that libs/qc has default limits for', () => {
    for (const m of modules)
      for (const v of m.qcVariables) expect(DEFAULT_QC_LIMITS[v], `${m.kind}: ${v}`).toBeDefined();
  });

  it('reads only series of the state that some kind writes', () => {
    const writtenStation = new Set(modules.flatMap((m) => m.writes.station));
    const writtenSite = new Set(modules.flatMap((m) => m.writes.site));
    for (const m of modules) {
      for (const v of m.reads.station) expect(writtenStation.has(v), `${m.kind} reads ${v}`).toBe(true);
      for (const v of m.reads.site) expect(writtenSite.has(v), `${m.kind} reads ${v}`).toBe(true);
    }
    // and every series of the state has exactly one writer
    for (const v of STATION_VARS)
      expect(modules.filter((m) => m.writes.station.includes(v)).length, v).toBe(1);
    for (const v of SITE_VARS) expect(modules.filter((m) => m.writes.site.includes(v)).length, v).toBe(1);
  });

  it('takes a pressure burst as complete at its last sample, other kinds at their time', () => {
    const t0 = Date.UTC(2026, 2, 1);
    const burst = {
      kind: 'pressure',
      tMs: t0,
      fs_hz: 2,
      p_dbar: new Array<number>(1024).fill(1.5),
    } as Parameters<typeof pressure.completeMs>[0];
    // 1024 samples at 2 Hz: the last is 1023 / 2 = 511.5 s after the first.
    expect(pressure.completeMs(burst)).toBe(t0 + 511_500);
    expect(ctd.completeMs({ tMs: t0 } as Parameters<typeof ctd.completeMs>[0])).toBe(t0);
  });
});
