import { describe, expect, it } from 'vitest';
import { newClientRef, parseEntered, toMeasurement, unitsFor } from '@/lib/walk/entry';

describe('numbers as typed on site', () => {
  it('reads decimals with a point or a comma', () => {
    expect(parseEntered('12.5')).toBe(12.5);
    expect(parseEntered('12,5')).toBe(12.5);
    expect(parseEntered(' .5 ')).toBe(0.5);
  });

  it('reads tape-measure fractions of an inch', () => {
    expect(parseEntered('2-1/4')).toBe(2.25);
    expect(parseEntered('2 1/4')).toBe(2.25);
    expect(parseEntered('3/8')).toBe(0.375);
  });

  it('refuses what is not a number', () => {
    for (const text of ['', 'abc', '1/0', '2-', '1.2.3']) expect(parseEntered(text), text).toBeNull();
  });
});

describe('units offered and values stored', () => {
  it('offers the organisation’s system first', () => {
    expect(unitsFor('length', 'imperial')).toEqual(['in', 'mm']);
    expect(unitsFor('length', 'metric')).toEqual(['mm', 'in']);
    expect(unitsFor('force', 'imperial')).toEqual(['lbf', 'N']);
    expect(unitsFor('mass', 'metric')).toEqual(['kg', 'lb']);
    expect(unitsFor('time', 'imperial')).toEqual(['s']);
  });

  it('keeps the value as entered with its canonical value', () => {
    // 1 in = 25.4 mm exactly (NIST SP 811, Appendix B)
    expect(toMeasurement('length', 2.25, 'in')).toEqual({ value: 2.25, unit: 'in', canonical: 57.15 });
    // 1 lbf = 4.4482216152605 N (NIST SP 811, Appendix B)
    expect(toMeasurement('force', 10, 'lbf').canonical).toBeCloseTo(44.482216, 6);
    expect(toMeasurement('count', 3, 'count', 'both sides')).toEqual({
      value: 3,
      unit: 'count',
      canonical: 3,
      note: 'both sides',
    });
  });

  it('makes a fresh v4 UUID for each photo or trace', () => {
    const a = newClientRef();
    expect(a).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(newClientRef()).not.toBe(a);
  });
});
