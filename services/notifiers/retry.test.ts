import { describe, it, expect } from 'vitest';
import { NotifyError, nextRetryDelayMs } from './index.js';

const policy = { baseMs: 5000, maxMs: 900_000 };
const net = new NotifyError('REEFD_NOTIFY_WEBHOOK_UNREACHABLE', 'x', true);

describe('nextRetryDelayMs (exponential backoff, full jitter)', () => {
  it('grows as base 2^(n-1) with the jitter drawn below it, floored at base/2 and capped', () => {
    // the shared backoff helper works in whole milliseconds (floored)
    expect(nextRetryDelayMs(net, 1, policy, () => 0.999999)).toBe(4999);
    expect(nextRetryDelayMs(net, 4, policy, () => 0.5)).toBe(20_000); // 0.5 x 40 s
    expect(nextRetryDelayMs(net, 4, policy, () => 0)).toBe(2500); // floor
    expect(nextRetryDelayMs(net, 30, policy, () => 0.999999)).toBe(899_999); // cap
  });
  it('waits the full cap on errors a retry cannot fix, and on programming errors', () => {
    expect(
      nextRetryDelayMs(new NotifyError('REEFD_NOTIFY_WEBHOOK_STATUS', '404', false), 1, policy, () => 0),
    ).toBe(900_000);
    expect(nextRetryDelayMs(new TypeError('bug'), 1, policy, () => 0)).toBe(900_000);
  });
});
