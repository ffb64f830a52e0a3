import { describe, expect, it } from 'vitest';
import { checkAbove, checkAtLeast, checkAtMost, checkBelow, combinePasses } from '@/lib/rules/calculators/limit-check';
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
    expect(checkAtMost(null, 5)).toEqual({ pass: null, rule: 'at_most', measured: null, limit: 5, margin: null });
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
});
