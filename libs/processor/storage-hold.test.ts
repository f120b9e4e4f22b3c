// Windows held a window late for a centred storage term (storage-hold.ts; docs/methods/metabolism.md 6.1, 6.6),
// on the synthetic deployment of test-helpers.ts with the transect's O2 swinging in time: where the storage term
// dominates, the window waits for the next one, comes out valid with the centred estimate, and its NCP follows
// the swing; the wait is in the checkpoint, and the end of a replay computes what still waits.
import { describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../contract/index.js';
import type { ProcessorState } from './state.js';
import {
  deploymentMessages,
  fluxes,
  HOUR,
  MIN,
  runDeployment,
  startDeployment,
  T0,
  type Script,
} from './test-helpers.js';

const W = 30 * MIN;
const CADENCE = 10 * MIN;
const DELAY = 20 * MIN; // window_delay_min
const LATENESS = 10 * MIN;
const SWING = { amplitudeUmolL: 20, periodH: 6 };
const script: Script = { o2Swing: SWING, calm: true };
const messages = deploymentMessages(10, script);
const { records } = runDeployment(messages);
const flat = runDeployment(deploymentMessages(10, { calm: true })).records;
const centred = (r: DerivedRecord) => String(r.notes).includes('storage_centred');
const ncpOf = (rs: DerivedRecord[], t: string) =>
  rs.find((r) => r.type === 'flux' && r.t === t)?.ncp_mmol_m2_h as number;

describe('a window where the storage term dominates', () => {
  const held = fluxes(records).filter(centred);

  it('waits for the next window and comes out valid with the centred storage term', () => {
    expect(held.length).toBeGreaterThan(20);
    for (const r of held) {
      expect(r.valid, r.t).toBe(true);
      expect(r.storage_fraction as number).toBeGreaterThan(0.3);
    }
    // every window the steadiness test would fail was held (none comes out invalid for it)
    expect(fluxes(records).filter((r) => String(r.invalid_reasons).includes('storage_dominates'))).toEqual(
      [],
    );
  });

  it('follows the swing: the centred difference of block means, within the noise', () => {
    expect(held.filter((x) => Date.parse(x.t) > T0 + 2 * HOUR).length).toBeGreaterThan(25);
    // The swing adds rho h dCm/dt to NCP; with 1000/rho umol/kg per umol/L it is 1000 h dC/dt (umol/L/s). A
    // block mean of the six 5-min samples of a window stands for 12.5 min into it (2.5 min before the centre)
    // and damps the sine by D = sin(3 w dt)/(6 sin(w dt/2)); a centred difference of block means W apart sees
    // A w cos(w t') sinc(w W) D (algebra).
    const w = (2 * Math.PI) / (SWING.periodH * HOUR);
    const dt = 5 * MIN;
    const damp = (Math.sin(3 * w * dt) / (6 * Math.sin((w * dt) / 2))) * (Math.sin(w * W) / (w * W));
    for (const r of held.filter((x) => Date.parse(x.t) > T0 + 2 * HOUR)) {
      const t = Date.parse(r.t) - dt / 2;
      const rate = SWING.amplitudeUmolL * w * 1000 * Math.cos(w * (t - T0)) * damp; // umol/L per s
      // h x 1000 L/m3 x rate in umol m-2 s-1, x 3.6 in mmol m-2 h-1
      const expected = (r.depth_m as number) * rate * 3600;
      const d = (r.ncp_mmol_m2_h as number) - ncpOf(flat, r.t);
      // Noise: 0.4 umol/L per sample gives about 0.25 mmol m-2 h-1 on the centred term and 0.5 on the
      // backward term of the run without the swing; 3 sd of their difference. The backward difference would
      // lag by 17.5 min, up to 9 mmol m-2 h-1 at this amplitude (A w x 17.5 min x 1000 h x 3.6).
      expect(Math.abs(d - expected), r.t).toBeLessThan(1.5);
    }
  });

  it('comes out a window late: after the windows that end up to a window after it, before later ones', () => {
    const order = fluxes(records).filter((r) => r.transect === 'flat');
    const endOf = (r: DerivedRecord) => Date.parse(r.t) + W / 2;
    for (const r of held) {
      const i = order.indexOf(r);
      const end = endOf(r);
      // the tick of end + W computes the held window first, then the window ending there
      for (const x of order.slice(0, i)) expect(endOf(x), r.t).toBeLessThanOrEqual(end + W - CADENCE);
      for (const x of order.slice(i + 1)) expect(endOf(x), r.t).toBeGreaterThan(end);
      // right after the window ending a cadence earlier, unless that one waited too
      const before = order.find((x) => endOf(x) === end + W - CADENCE);
      if (before !== undefined && !centred(before)) expect(order[i - 1]).toBe(before);
    }
  });

  it('is released by the message that moves the watermark past its next window (end + W + delay)', () => {
    const r = held[3]!;
    const end = Date.parse(r.t) + W / 2;
    const { processor, feed } = startDeployment();
    const before = messages.filter((m) => m.tMs <= end + W + DELAY + LATENESS - 5 * MIN);
    expect(fluxes(feed(before)).some((x) => x.t === r.t)).toBe(false);
    const rest = messages.slice(before.length, before.length + 40);
    const out = feed(rest);
    expect(fluxes(out).find((x) => x.t === r.t)?.ncp_mmol_m2_h).toBe(r.ncp_mmol_m2_h);
    expect(processor.watermarkMs()).toBeGreaterThanOrEqual(end + W + DELAY);
  });

  it('waits in the checkpoint: a restart in the middle gives the same records', () => {
    const r = held[3]!;
    const cut = messages.findIndex((m) => m.tMs > Date.parse(r.t) + W / 2 + 2 * CADENCE + LATENESS + DELAY);
    const a = startDeployment();
    const first = a.feed(messages.slice(0, cut));
    const snap = JSON.parse(JSON.stringify(a.processor.snapshot())) as ProcessorState;
    expect(snap.heldWindows.map((w) => w.endMs)).toContain(Date.parse(r.t) + W / 2);
    const b = startDeployment({}, snap);
    const rest = [...b.feed(messages.slice(cut)), ...b.processor.drain()];
    expect([...first, ...rest].map((x) => JSON.stringify(x))).toEqual(records.map((x) => JSON.stringify(x)));
  });

  it('at the end of a replay, is computed with what there is', () => {
    const r = held[3]!;
    const end = Date.parse(r.t) + W / 2;
    // the data stop once the window itself is due: its next window has 20 min of data
    const { records: out } = runDeployment(messages.filter((m) => m.tMs <= end + DELAY + LATENESS));
    const last = fluxes(out).find((x) => x.t === r.t && x.transect === 'flat');
    expect(last?.valid).toBe(true);
    expect(centred(last!)).toBe(true);
  });

  it('without a next window (every sensor silent after it), comes out invalid for its storage term', () => {
    const r = held[3]!;
    const end = Date.parse(r.t) + W / 2;
    const gap = messages.filter((m) => m.tMs < end || m.tMs >= end + W + 15 * MIN);
    const { records: out } = runDeployment(gap);
    const last = fluxes(out).find((x) => x.t === r.t && x.transect === 'flat')!;
    expect(last.valid).toBe(false);
    expect(String(last.invalid_reasons).split(',')).toContain('storage_dominates');
    expect(centred(last)).toBe(false);
  });
});
