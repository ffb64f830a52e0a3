/** Measurements shown as entered, limits in the organisation's system, feet and inches as typed. */
import { describe, expect, it } from 'vitest';
import {
  formatAsEntered,
  formatCanonical,
  formatLimit,
  formatSize,
  parseFeetAndInches,
} from '@/lib/vocabulary';

describe('a measurement as entered', () => {
  it('keeps the unit it was measured in, never converting', () => {
    expect(formatSize({ value: 12, unit: 'ft', canonical: 3657.6 }, { value: 6, unit: 'ft' })).toBe(
      '12 ft × 6 ft',
    );
    expect(formatAsEntered({ value: 406, unit: 'mm', canonical: 406 })).toBe('406 mm');
    expect(formatAsEntered({ value: 3.6, unit: 'm' })).toBe('3.6 m');
  });

  it('writes fractional feet as feet and inches and inches as the tape reads them', () => {
    expect(formatAsEntered({ value: 12.5, unit: 'ft' })).toBe('12 ft 6 in');
    expect(formatAsEntered({ value: 2.25, unit: 'in' })).toBe('2-1/4 in');
    // Not on a 1/16 in: the decimals as typed (to 0.01).
    expect(formatAsEntered({ value: 2.3, unit: 'in' })).toBe('2.3 in');
  });
});

describe('a stored value or a limit in the organisation system', () => {
  it('reads 1828.8 mm as 6 ft (imperial) and 1828.8 mm (metric)', () => {
    expect(formatLimit(1828.8, 'mm', 'imperial')).toBe('6 ft');
    expect(formatLimit(1828.8, 'mm', 'metric')).toBe('1828.8 mm');
  });

  it('rounds a length that falls between sixteenths and says "about" for a limit', () => {
    // 25 mm = 0.984 in: nearest 1/16 in is 1 in.
    expect(formatCanonical(25, 'mm', 'imperial')).toBe('1 in');
    expect(formatLimit(25, 'mm', 'imperial')).toBe('about 1 in');
    expect(formatCanonical(3657.6, 'mm', 'imperial')).toBe('12 ft');
    expect(formatCanonical(400, 'N', 'imperial')).toBe('89.9 lbf');
  });
});

describe('feet and inches as typed', () => {
  it('reads feet, feet and inches, and inches with their marks or words', () => {
    expect(parseFeetAndInches("12'")).toEqual({ value: 12, unit: 'ft' });
    expect(parseFeetAndInches('12 ft')).toEqual({ value: 12, unit: 'ft' });
    expect(parseFeetAndInches(`12' 6"`)).toEqual({ value: 12.5, unit: 'ft' });
    expect(parseFeetAndInches('12 ft 6 in')).toEqual({ value: 12.5, unit: 'ft' });
    expect(parseFeetAndInches('6ft3in')).toEqual({ value: 6.25, unit: 'ft' });
    expect(parseFeetAndInches('2-1/4"')).toEqual({ value: 2.25, unit: 'in' });
    expect(parseFeetAndInches('16 in')).toEqual({ value: 16, unit: 'in' });
  });

  it('leaves bare numbers to the unit picker and refuses nonsense', () => {
    expect(parseFeetAndInches('12')).toBeNull();
    expect(parseFeetAndInches('12.5')).toBeNull();
    expect(parseFeetAndInches('')).toBeNull();
    expect(parseFeetAndInches('ft')).toBeNull();
    // 12 in or more after feet is a slip, not 13 ft.
    expect(parseFeetAndInches(`12' 14"`)).toBeNull();
    expect(parseFeetAndInches('1/0 in')).toBeNull();
  });
});
