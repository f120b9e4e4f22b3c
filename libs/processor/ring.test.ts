// The re-derivation ring's bounds (ring.ts): snapshots one per period over the reach, the messages since the
// oldest kept, at most maxMessages whatever the rate; lookups by time and sequence.
import { describe, expect, it } from 'vitest';
import { parseMessage, type SensorMessage } from '../contract/index.js';
import { MessageRing } from './ring.js';
import { createState } from './state.js';

const HOUR = 3_600_000;
const T0 = Date.UTC(2026, 6, 14);

function ctd(tMs: number): SensorMessage {
  const r = parseMessage(
    'reef/s/st/ctd/c',
    JSON.stringify({ v: 1, t: new Date(tMs).toISOString(), temp_c: 27, sal: 35 }),
  );
  if (!r.ok) throw new Error(r.reason);
  return r.message;
}

/** Feeds a message every minute for `hours`, snapshotting as the processor does. */
function feed(ring: MessageRing, hours: number): void {
  for (let t = T0; t < T0 + hours * HOUR; t += 60_000) {
    ring.add(ctd(t), t, t + 250, t);
    if (ring.due(t)) ring.snapshot(t, createState(['st']));
  }
}

describe('message ring', () => {
  it('keeps one snapshot per period over the reach, and the messages since the oldest', () => {
    const ring = new MessageRing({ everyMs: HOUR, reachMs: 3 * HOUR, maxMessages: 100_000 });
    feed(ring, 10);
    // snapshots at 06:00 ... 09:00 serve samples back to 06:59 (the reach from 09:59); 06:00 is the oldest
    expect(ring.snapshots).toBe(4);
    const oldest = ring.snapshotBefore(T0 + 6 * HOUR + 30 * 60_000);
    expect(oldest?.maxEventMs).toBe(T0 + 6 * HOUR);
    expect(ring.snapshotBefore(T0 + 5 * HOUR)).toBeUndefined();
    // the messages after the 06:00 snapshot: 06:01 ... 09:59
    expect(ring.size).toBe(4 * 60 - 1);
    const after = ring.after(oldest!);
    expect(after.length).toBe(ring.size);
    expect(after[0]?.message?.tMs).toBe(T0 + 6 * HOUR + 60_000);
    expect(after.every((e, i) => i === 0 || e.seq === (after[i - 1]?.seq as number) + 1)).toBe(true);
  });

  it('picks the latest snapshot at or before a time, and replays only what came after it', () => {
    const ring = new MessageRing({ everyMs: HOUR, reachMs: 24 * HOUR, maxMessages: 100_000 });
    feed(ring, 5);
    const s = ring.snapshotBefore(T0 + 2 * HOUR + 59 * 60_000);
    expect(s?.maxEventMs).toBe(T0 + 2 * HOUR);
    const after = ring.after(s!);
    expect(after[0]?.message?.tMs).toBe(T0 + 2 * HOUR + 60_000);
    expect(after.at(-1)?.message?.tMs).toBe(T0 + 5 * HOUR - 60_000);
  });

  it('holds at most maxMessages whatever the rate, dropping the oldest snapshots with them', () => {
    const ring = new MessageRing({ everyMs: HOUR, reachMs: 48 * HOUR, maxMessages: 500 });
    feed(ring, 24);
    expect(ring.size).toBeLessThanOrEqual(500);
    expect(ring.size).toBeGreaterThan(0);
    // what is left replays from a snapshot it still has
    const first = ring.snapshotBefore(Infinity);
    expect(first).toBeDefined();
    const s = ring.snapshotBefore(T0 + 24 * HOUR - 9 * HOUR);
    expect(s === undefined || ring.after(s).length <= 500).toBe(true);
  });

  it('keeps no messages before its first snapshot (nothing could replay them)', () => {
    const ring = new MessageRing({ everyMs: HOUR, reachMs: HOUR, maxMessages: 1000 });
    ring.add(ctd(T0), T0, T0, T0);
    expect(ring.size).toBe(0);
    ring.snapshot(T0, createState(['st']));
    ring.add(ctd(T0 + 60_000), T0 + 60_000, T0 + 60_000, T0 + 60_000);
    expect(ring.size).toBe(1);
  });
});
