import { describe, expect, it } from 'vitest';
import {
  assessEntrapmentProtection,
  assessSwingOperatorGeometry,
  calculateHrn,
  evaluateForceTrace,
  voltageDrop,
} from '@/lib/rules/calculators';

/** Fails on anything JSON would drop or change: undefined, NaN, ±Infinity, -0, functions. */
function assertPlainJson(value: unknown, path = '$'): void {
  if (value === null || typeof value === 'string' || typeof value === 'boolean') return;
  if (typeof value === 'number') {
    if (!Number.isFinite(value) || Object.is(value, -0)) throw new Error(`${path} is ${value}`);
    return;
  }
  if (Array.isArray(value)) return value.forEach((item, i) => assertPlainJson(item, `${path}[${i}]`));
  if (typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    for (const [key, item] of Object.entries(value)) assertPlainJson(item, `${path}.${key}`);
    return;
  }
  throw new Error(`${path} is not plain JSON (${typeof value})`);
}

const samples = Array.from({ length: 6001 }, (_, i) => {
  const t = i / 1000;
  return { t, f: t <= 0.1 ? 3500 * t : t <= 0.6 ? 350 - 680 * (t - 0.1) : 10 };
});

const results: Record<string, unknown> = {
  entrapment: assessEntrapmentProtection({
    gateKind: 'swing',
    usageClass: 2,
    automaticClosing: true,
    manufacturedOn: '2019-04-01',
    devices: { opening: [{ type: 'A', monitored: false }], closing: [{ type: 'B1', monitored: true }] },
    entrapmentZones: { opening: true, closing: true },
  }),
  forceTrace: evaluateForceTrace(samples, { gateKind: 'swing', gapMm: 300 }),
  swingGeometry: assessSwingOperatorGeometry({
    aMm: 200,
    bMm: 150,
    bracketFromHingeMm: 1000,
    retractedLengthMm: 900,
    strokeMm: 200,
    targetOpeningDeg: 90,
  }),
  voltageDrop: voltageDrop({ awg: 12, stranded: true, oneWayLengthM: 25, currentA: 3, supplyVoltage: 24 }),
  hrn: calculateHrn({ lo: 'possible', fe: 'daily', dph: 'fatality', np: '3_7' }),
};

describe('calculator results are plain JSON for hashing', () => {
  for (const [name, result] of Object.entries(results)) {
    it(`${name} holds no undefined, NaN, Infinity or -0 and survives a JSON round trip`, () => {
      expect(() => assertPlainJson(result)).not.toThrow();
      expect(JSON.parse(JSON.stringify(result))).toEqual(result);
    });
  }

  it('catches an undefined field', () => {
    expect(() => assertPlainJson({ a: undefined })).toThrow(/\$\.a/);
    expect(() => assertPlainJson({ a: [Number.NaN] })).toThrow(/\$\.a\[0\]/);
  });
});
