import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  checkAbove,
  checkAtLeast,
  checkAtMost,
  checkBelow,
  combinePasses,
} from '@/lib/rules/calculators/limit-check';
import { roundTo } from '@/lib/rules/calculators/numbers';

describe('limit checks', () => {
  it('includes the limit for at-most and at-least', () => {
    expect(checkAtMost(10, 10).pass).toBe(true);
    expect(checkAtMost(10.1, 10).pass).toBe(false);
    expect(checkAtLeast(10, 10).pass).toBe(true);
    expect(checkAtLeast(9.9, 10).pass).toBe(false);
  });

  it('excludes the limit for below and above', () => {
    expect(checkBelow(10, 10).pass).toBe(false);
    expect(checkBelow(9.9, 10).pass).toBe(true);
    expect(checkAbove(10, 10).pass).toBe(false);
    expect(checkAbove(10.1, 10).pass).toBe(true);
  });

  it('reports a margin that is positive inside the limit', () => {
    expect(checkAtMost(90, 101.6).margin).toBe(11.6);
    expect(checkAtLeast(300, 406.4).margin).toBe(-106.4);
  });

  it('judges on the rounded value it reports', () => {
    // 406.38 shows as 406.4, so it must not fail a 406.4 minimum
    expect(checkAtLeast(406.38, 406.4)).toMatchObject({ measured: 406.4, pass: true, margin: 0 });
  });

  it('leaves an unmeasured value open', () => {
    expect(checkAtMost(null, 5)).toEqual({
      pass: null,
      rule: 'at_most',
      measured: null,
      limit: 5,
      margin: null,
    });
  });

  it('combines outcomes: a fail beats an unknown, an unknown beats a pass', () => {
    expect(combinePasses(true, null, false)).toBe(false);
    expect(combinePasses(true, null)).toBeNull();
    expect(combinePasses(true, true)).toBe(true);
  });
});

describe('roundTo', () => {
  it('rounds half away from float noise and never returns -0', () => {
    expect(roundTo(1.005, 2)).toBe(1.01);
    expect(Object.is(roundTo(-0.04, 1), 0)).toBe(true);
    expect(roundTo(0.1 + 0.2, 3)).toBe(0.3);
  });

  it('gives the same result as a decimal round trip for every value, near halves included', () => {
    // The definition the fast path must match: tame float noise to 15 significant digits
    // (IEEE 754 doubles carry 15–17), then round half up. common practice, no source
    const reference = (value: number, decimals: number) =>
      Math.round(Number((value * 10 ** decimals).toPrecision(15))) / 10 ** decimals + 0;
    const nearHalf = fc
      .tuple(
        fc.integer({ min: -10_000_000, max: 10_000_000 }),
        fc.integer({ min: 0, max: 4 }),
        fc.integer({ min: -3, max: 3 }),
      )
      .map(
        ([n, decimals, ulps]) =>
          [
            (n + 0.5) / 10 ** decimals + ulps * Number.EPSILON * Math.abs(n / 10 ** decimals),
            decimals,
          ] as const,
      );
    const anyValue = fc.tuple(
      fc.double({ min: -1e9, max: 1e9, noNaN: true }),
      fc.integer({ min: 0, max: 6 }),
    );
    fc.assert(
      fc.property(fc.oneof(nearHalf, anyValue), ([value, decimals]) =>
        Object.is(roundTo(value, decimals), reference(value, decimals)),
      ),
      { numRuns: 20_000 },
    );
  });
});
