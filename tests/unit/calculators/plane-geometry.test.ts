import { describe, expect, it } from 'vitest';
import { hypot } from '@/lib/rules/calculators/plane-geometry';
import { createPrng } from '../rules/support/prng';

/** Bit patterns, so -0 and 0 or two NaNs are told apart exactly. */
const bits = (value: number) => {
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, value);
  return view.getBigUint64(0).toString(16);
};

describe('hypot', () => {
  it('gives the bits Math.hypot gives for a million pairs of every magnitude and sign', () => {
    const rng = createPrng(4_051_209);
    const buffer = new DataView(new ArrayBuffer(8));
    // Any double at all: random bit patterns (subnormals, huge values, NaNs, infinities).
    const anyDouble = () => {
      buffer.setUint32(0, Math.floor(rng.next() * 2 ** 32));
      buffer.setUint32(4, Math.floor(rng.next() * 2 ** 32));
      return buffer.getFloat64(0);
    };
    // What the swing sweep feeds it: millimetre differences with fractions.
    const millimetres = () => (rng.next() - 0.5) * 10 ** (1 + rng.next() * 4);
    const mismatches: string[] = [];
    for (let i = 0; i < 1_000_000; i++) {
      const x = i % 2 === 0 ? millimetres() : anyDouble();
      const y = i % 3 === 0 ? anyDouble() : millimetres();
      if (bits(hypot(x, y)) !== bits(Math.hypot(x, y))) mismatches.push(`${x}, ${y}`);
    }
    expect(mismatches).toEqual([]);
  }, 60_000);

  it('follows Math.hypot at zeros, infinities, NaN and the edges of the range', () => {
    const edges = [
      0,
      -0,
      1,
      -1,
      3,
      4,
      Number.MIN_VALUE,
      -Number.MIN_VALUE,
      Number.MAX_VALUE,
      -Number.MAX_VALUE,
    ];
    const special = [Infinity, -Infinity, Number.NaN, 1e-310, 1e308, 2 ** -1074, 0.1, 0.2, 0.3];
    const values = [...edges, ...special];
    for (const x of values)
      for (const y of values) expect(bits(hypot(x, y)), `hypot(${x}, ${y})`).toBe(bits(Math.hypot(x, y)));
    expect(hypot(3, 4)).toBe(5);
    expect(hypot(Number.NaN, Infinity)).toBe(Infinity);
  });
});
