import { describe, expect, it } from 'vitest';
import {
  createAlertEngine,
  createSiteSilence,
  silenceActive,
  silenceCheck,
  silenceNextCheckMs,
  silenceOnMessage,
  type SiteSilenceState,
} from './index.js';

const MIN = 60_000;
const W0 = Date.UTC(2026, 11, 1, 8, 0, 0);
const CFG = { silenceMs: 15 * MIN, severity: 'critical' as const };
const iso = (ms: number) => new Date(ms).toISOString();

describe('site_silent: the wall-clock dead-man of the live daemon (docs/contract-v1.md, E2/E3)', () => {
  it('raises once when no message came for silence_min, stamped when the silence passed it; the next message clears', () => {
    const st = createSiteSilence('ornen-reef', W0);
    expect(silenceOnMessage(st, CFG, W0 + MIN)).toEqual([]);
    expect(silenceCheck(st, CFG, W0 + 16 * MIN)).toEqual([]); // exactly 15 min: not yet
    expect(silenceNextCheckMs(st, CFG)).toBe(W0 + 16 * MIN + 1);
    const r = silenceCheck(st, CFG, W0 + 16.5 * MIN);
    expect(r).toEqual([
      {
        type: 'alert',
        site: 'ornen-reef',
        t: iso(W0 + 16 * MIN),
        rule: 'site_silent',
        class: 'fault',
        state: 'raised',
        value: 930, // 15.5 min of silence so far, s
        limit: 900,
        fault: 'silent',
        id: expect.stringMatching(/^[0-9a-f]{8}$/),
        severity: 'critical',
      },
    ]);
    expect(r[0]).not.toHaveProperty('station');
    expect(silenceCheck(st, CFG, W0 + 40 * MIN)).toEqual([]); // raised once
    expect(silenceNextCheckMs(st, CFG)).toBeNull();
    const c = silenceOnMessage(st, CFG, W0 + 41 * MIN);
    expect(c).toEqual([
      {
        ...r[0],
        t: iso(W0 + 41 * MIN),
        state: 'cleared',
        value: 2400, // the whole 40-min silence
        raised_t: iso(W0 + 16 * MIN),
      },
    ]);
    expect(silenceOnMessage(st, CFG, W0 + 42 * MIN)).toEqual([]);
  });

  it('counts a site that never spoke from the daemon start', () => {
    const st = createSiteSilence('ornen-reef', W0);
    expect(silenceCheck(st, CFG, W0 + 15 * MIN + 1)[0]?.t).toBe(iso(W0 + 15 * MIN));
  });

  it('survives a restart as plain JSON: the raise is not repeated and its clear still comes, with the same id', () => {
    const st = createSiteSilence('ornen-reef', W0);
    const raised = silenceCheck(st, CFG, W0 + 20 * MIN);
    const back = JSON.parse(JSON.stringify(st)) as SiteSilenceState;
    expect(silenceActive(back, CFG)?.id).toBe(raised[0]!.id);
    expect(silenceCheck(back, CFG, W0 + 30 * MIN)).toEqual([]);
    expect(silenceOnMessage(back, CFG, W0 + 31 * MIN)[0]).toMatchObject({
      state: 'cleared',
      id: raised[0]!.id,
    });
    expect(silenceActive(back, CFG)).toBeNull();
  });

  it('a wall clock stepped back does not push the last message into the future', () => {
    const st = createSiteSilence('ornen-reef', W0);
    silenceOnMessage(st, CFG, W0 + 10 * MIN);
    silenceOnMessage(st, CFG, W0 + 5 * MIN); // NTP step back
    expect(st.lastMs).toBe(W0 + 10 * MIN);
  });
});

describe('site_silent settings from the alerts section', () => {
  it('takes alerts.silence_min (default 15) and is critical', () => {
    expect(createAlertEngine(undefined, 'x').rules.silence).toEqual({
      silenceMs: 15 * MIN,
      severity: 'critical',
    });
    expect(createAlertEngine({ silence_min: 40 }, 'x').rules.silence.silenceMs).toBe(40 * MIN);
  });
});
