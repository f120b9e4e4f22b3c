import { describe, it, expect } from 'vitest';
import { ReefdError } from '../../libs/contract/index.js';
import { backoffDelayMs, retry, type Sleep } from './backoff.js';

const retriable = (): ReefdError => new ReefdError('REEFD_SINK_UNAVAILABLE', 'down', { retriable: true });

function fakeSleep(): { sleep: Sleep; waits: number[] } {
  const waits: number[] = [];
  return { waits, sleep: async (ms) => void waits.push(ms) };
}

describe('retry', () => {
  it('backs off exponentially with full jitter, capped (common practice: delay = r * min(cap, base * 2^n))', () => {
    const o = { baseMs: 100, maxMs: 1000, random: () => 0.5 };
    expect([0, 1, 2, 3, 4, 10].map((n) => backoffDelayMs(n, o))).toEqual([50, 100, 200, 400, 500, 500]);
    expect(backoffDelayMs(0, { ...o, random: () => 0.999 })).toBe(99);
    expect(backoffDelayMs(0, o, 3000)).toBe(3000);
  });

  it('retries retriable errors until success, waiting the backoff between attempts', async () => {
    const { sleep, waits } = fakeSleep();
    let calls = 0;
    const got = await retry(
      async () => {
        if (++calls < 4) throw retriable();
        return 'ok';
      },
      { baseMs: 10, maxMs: 1000, random: () => 0.5, maxAttempts: Infinity, sleep },
    );
    expect(got).toBe('ok');
    expect(calls).toBe(4);
    expect(waits).toEqual([5, 10, 20]);
  });

  it('never retries programming errors or non-retriable errors', async () => {
    for (const e of [new TypeError('x is undefined'), new RangeError('bad'), new ReefdError('REEFD_USAGE')]) {
      const { sleep, waits } = fakeSleep();
      let calls = 0;
      const err = await retry(
        async () => {
          calls++;
          throw e;
        },
        { baseMs: 10, maxMs: 100, random: () => 0.5, maxAttempts: 10, sleep },
      ).catch((x: unknown) => x);
      expect(err).toBe(e);
      expect(calls).toBe(1);
      expect(waits).toEqual([]);
    }
  });

  it('gives up after maxAttempts and honours a Retry-After hint as the minimum wait', async () => {
    const { sleep, waits } = fakeSleep();
    let calls = 0;
    const hinted = new ReefdError('REEFD_SINK_UNAVAILABLE', '429', {
      retriable: true,
      detail: { retryAfterMs: 2000 },
    });
    const err = await retry(
      async () => {
        calls++;
        throw hinted;
      },
      { baseMs: 10, maxMs: 100, random: () => 0.5, maxAttempts: 3, sleep },
    ).catch((x: unknown) => x);
    expect(err).toBe(hinted);
    expect(calls).toBe(3);
    expect(waits).toEqual([2000, 2000]);
  });

  it('treats connection refusals as retriable (ECONNREFUSED)', async () => {
    const { sleep } = fakeSleep();
    let calls = 0;
    await retry(
      async () => {
        if (++calls === 1) throw Object.assign(new Error('connect ECONNREFUSED'), { code: 'ECONNREFUSED' });
      },
      { baseMs: 1, maxMs: 1, random: () => 0, maxAttempts: 2, sleep },
    );
    expect(calls).toBe(2);
  });
});
