import { describe, expect, it } from 'vitest';
import {
  fromKilograms,
  fromMetresPerSecond,
  fromMillimetres,
  fromNewtons,
  isUnitOf,
  measure,
  toKilograms,
  toMetresPerSecond,
  toMillimetres,
  toNewtons,
} from '@/lib/units';
import { formatForce, formatLength, formatMass, formatMeasured, formatSpeed } from '@/lib/vocabulary';

describe('length conversions', () => {
  it('converts an inch to exactly 25.4 mm', () => {
    // NIST SP 811 Appendix B: 1 in = 2.54 cm exactly
    expect(toMillimetres(1, 'in')).toBe(25.4);
    expect(toMillimetres(16, 'in')).toBeCloseTo(406.4, 10);
  });

  it('converts a foot to exactly 304.8 mm', () => {
    // NIST SP 811 Appendix B: 1 ft = 0.3048 m exactly
    expect(toMillimetres(1, 'ft')).toBe(304.8);
    expect(toMillimetres(6, 'ft')).toBeCloseTo(1828.8, 10);
  });

  it('converts the metric units by powers of ten', () => {
    expect(toMillimetres(2.5, 'cm')).toBe(25);
    expect(toMillimetres(1.83, 'm')).toBeCloseTo(1830, 10);
    expect(toMillimetres(7, 'mm')).toBe(7);
  });

  it('converts millimetres back to every unit', () => {
    expect(fromMillimetres(57.15, 'in')).toBeCloseTo(2.25, 12);
    expect(fromMillimetres(2438.4, 'ft')).toBeCloseTo(8, 12);
    expect(fromMillimetres(1829, 'm')).toBeCloseTo(1.829, 12);
    expect(fromMillimetres(25, 'cm')).toBe(2.5);
  });

  it('round-trips every length unit', () => {
    for (const unit of ['mm', 'cm', 'm', 'in', 'ft'] as const) {
      expect(fromMillimetres(toMillimetres(123.456, unit), unit)).toBeCloseTo(123.456, 9);
    }
  });
});

describe('force, mass and speed conversions', () => {
  it('converts a pound-force to 4.4482216152605 N', () => {
    // NIST SP 811 Appendix B
    expect(toNewtons(1, 'lbf')).toBe(4.4482216152605);
    expect(fromNewtons(4.4482216152605, 'lbf')).toBe(1);
  });

  it('converts a kilogram-force to exactly 9.80665 N', () => {
    // standard acceleration of gravity, NIST SP 811
    expect(toNewtons(1, 'kgf')).toBe(9.80665);
    expect(fromNewtons(400, 'kgf')).toBeCloseTo(40.7886, 4);
  });

  it('leaves newtons unchanged', () => {
    expect(toNewtons(150, 'N')).toBe(150);
  });

  it('converts a pound to exactly 0.45359237 kg', () => {
    // NIST SP 811 Appendix B: avoirdupois pound
    expect(toKilograms(1, 'lb')).toBe(0.45359237);
    expect(toKilograms(75, 'lb')).toBeCloseTo(34.0194, 4);
    expect(fromKilograms(0.45359237, 'lb')).toBe(1);
  });

  it('converts 1 ft/s to exactly 0.3048 m/s', () => {
    expect(toMetresPerSecond(1, 'ft/s')).toBe(0.3048);
    expect(fromMetresPerSecond(0.3048, 'ft/s')).toBe(1);
    expect(toMetresPerSecond(0.3, 'm/s')).toBe(0.3);
  });
});

describe('input checks', () => {
  it('refuses a unit that is not of the kind', () => {
    // A unit string from a form may be anything; it must fail loudly, never yield NaN.
    expect(() => toMillimetres(1, 'yd' as never)).toThrow(RangeError);
    expect(() => measure('force', 1, 'kg' as never)).toThrow(/Unknown force unit/);
    expect(isUnitOf('length', 'in')).toBe(true);
    expect(isUnitOf('length', 'lbf')).toBe(false);
    expect(isUnitOf('length', 'toString')).toBe(false);
  });

  it('refuses values that are not finite', () => {
    expect(() => toMillimetres(Number.NaN, 'mm')).toThrow(RangeError);
    expect(() => toNewtons(Number.POSITIVE_INFINITY, 'N')).toThrow(RangeError);
  });
});

describe('measure', () => {
  it('keeps the entered value and unit beside the canonical millimetres', () => {
    expect(measure('length', 16, 'in')).toEqual({ value: 16, unit: 'in', canonical: 406.4 });
  });

  it('stores canonical values free of float noise', () => {
    // 0.1 × 25.4 is 2.5400000000000005 in binary floating point
    expect(measure('length', 0.1, 'in').canonical).toBe(2.54);
  });

  it('converts forces, masses and speeds to N, kg and m/s', () => {
    expect(measure('force', 1, 'lbf').canonical).toBe(4.448222);
    expect(measure('mass', 75, 'lb').canonical).toBe(34.019428);
    expect(measure('speed', 1, 'ft/s').canonical).toBe(0.3048);
  });

  it('shows a measurement as it was entered', () => {
    expect(formatMeasured(measure('length', 2.25, 'in'))).toBe('2.25 in');
  });
});

describe('display formatting', () => {
  it('shows metric lengths in millimetres without trailing zeros', () => {
    expect(formatLength(406.4, 'metric')).toBe('406.4 mm');
    expect(formatLength(1829, 'metric')).toBe('1829 mm');
    expect(formatLength(7.96, 'metric')).toBe('8 mm');
  });

  it('shows metric lengths of 10 m and more in metres', () => {
    expect(formatLength(12_345, 'metric')).toBe('12.35 m');
  });

  it('shows short imperial lengths as fractional inches the way the trade writes them', () => {
    expect(formatLength(57.15, 'imperial')).toBe('2-1/4 in');
    expect(formatLength(406.4, 'imperial')).toBe('16 in');
    expect(formatLength(3.175, 'imperial')).toBe('1/8 in');
    expect(formatLength(0, 'imperial')).toBe('0 in');
  });

  it('shows long imperial lengths in feet and inches', () => {
    expect(formatLength(1828.8, 'imperial')).toBe('6 ft');
    expect(formatLength(1828.8 + 38.1, 'imperial')).toBe('6 ft 1-1/2 in');
    expect(formatLength(2438.4, 'imperial')).toBe('8 ft');
  });

  it('rounds imperial lengths to the chosen fraction', () => {
    expect(formatLength(25.4 * (1 + 3 / 16), 'imperial', { fractionDenominator: 16 })).toBe('1-3/16 in');
    expect(formatLength(25.4 * (1 + 3 / 16), 'imperial', { fractionDenominator: 4 })).toBe('1-1/4 in');
  });

  it('formats forces, masses and speeds in either system', () => {
    expect(formatForce(400, 'metric')).toBe('400 N');
    expect(formatForce(400, 'imperial')).toBe('89.9 lbf');
    expect(formatMass(34, 'metric')).toBe('34 kg');
    expect(formatMass(34.019428, 'imperial')).toBe('75 lb');
    expect(formatSpeed(0.3048, 'metric')).toBe('0.3 m/s');
    expect(formatSpeed(0.3048, 'imperial')).toBe('1 ft/s');
  });
});
