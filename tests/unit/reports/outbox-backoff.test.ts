/** Retry delays of the mail outbox: exponential from the base, capped, with bounded jitter. */
import { describe, expect, it } from 'vitest';
import { retryDelayMs } from '../../../src/lib/server/outbox';

const settings = { retryBaseMs: 15_000, retryMaxMs: 30 * 60_000 };

describe('outbox retry delay', () => {
  it('doubles from the base with each attempt (no jitter at the midpoint)', () => {
    expect([1, 2, 3, 4].map((a) => retryDelayMs(a, settings, () => 0.5))).toEqual([
      15_000, 30_000, 60_000, 120_000,
    ]);
  });

  it('never exceeds the cap, whatever the attempt count', () => {
    expect(retryDelayMs(40, settings, () => 0.5)).toBe(30 * 60_000);
    expect(retryDelayMs(40, settings, () => 0.999)).toBeLessThanOrEqual(30 * 60_000 * 1.2);
  });

  it('spreads retries by at most 20 % either way', () => {
    expect(retryDelayMs(1, settings, () => 0)).toBe(12_000);
    expect(retryDelayMs(1, settings, () => 1)).toBe(18_000);
  });
});
