import { describe, expect, it } from 'vitest';
import {
  calculateHrn,
  deriveHrnFactors,
  HRN_TABLE_WIDELY_REPRINTED,
  hrnBand,
  npBand,
  npKey,
  type HrnTable,
} from '@/lib/rules/calculators/hrn';

describe('calculateHrn', () => {
  // HRN tables: one widely reprinted version, as in REFERENCES.md (secondary source, verify)
  it('multiplies LO × FE × DPH × NP', () => {
    // possible 2 × daily 2.5 × major fracture 4 × 1–2 people 1 = 20
    const result = calculateHrn({ lo: 'possible', fe: 'daily', dph: 'major_fracture', np: '1_2' });
    expect(result.factors).toEqual({ lo: 2, fe: 2.5, dph: 4, np: 1 });
    expect(result.hrn).toBe(20);
    expect(result.band).toBe('significant');
  });

  it('rates a likely, hourly, fatal hazard to 8–15 people as unacceptable', () => {
    // 10 × 4 × 15 × 4 = 2400
    const result = calculateHrn({ lo: 'likely', fe: 'hourly', dph: 'fatality', np: '8_15' });
    expect(result.hrn).toBe(2400);
    expect(result.band).toBe('unacceptable');
  });

  it('keeps small ratings exact', () => {
    // 0.033 × 0.5 × 0.1 × 1 = 0.00165
    expect(
      calculateHrn({ lo: 'almost_impossible', fe: 'annually', dph: 'scratch_bruise', np: '1_2' }).hrn,
    ).toBe(0.00165);
  });

  it('uses a table passed in', () => {
    // the other published DPH column: major fracture 2
    const other: HrnTable = {
      ...HRN_TABLE_WIDELY_REPRINTED,
      dph: { ...HRN_TABLE_WIDELY_REPRINTED.dph, major_fracture: 2 },
    };
    expect(calculateHrn({ lo: 'possible', fe: 'daily', dph: 'major_fracture', np: '1_2' }, other).hrn).toBe(
      10,
    );
  });

  it('refuses a key the table does not have', () => {
    expect(() => calculateHrn({ lo: 'maybe', fe: 'daily', dph: 'fatality', np: '1_2' })).toThrow(
      /LO key "maybe"/,
    );
    expect(() => calculateHrn({ lo: 'possible', fe: 'daily', dph: 'fatality', np: '2_3' })).toThrow(/NP key/);
    expect(() => calculateHrn({ lo: 'toString', fe: 'daily', dph: 'fatality', np: '1_2' })).toThrow(
      RangeError,
    );
  });
});

describe('hrnBand', () => {
  it('puts each boundary value in the lower band (upper bounds inclusive)', () => {
    expect(hrnBand(0)).toBe('negligible');
    expect(hrnBand(1)).toBe('negligible');
    expect(hrnBand(1.01)).toBe('very_low');
    expect(hrnBand(5)).toBe('very_low');
    expect(hrnBand(10)).toBe('low');
    expect(hrnBand(50)).toBe('significant');
    expect(hrnBand(100)).toBe('high');
    expect(hrnBand(500)).toBe('very_high');
    expect(hrnBand(1000)).toBe('extreme');
    expect(hrnBand(1000.01)).toBe('unacceptable');
  });

  it('refuses a negative rating', () => {
    expect(() => hrnBand(-1)).toThrow(RangeError);
  });
});

describe('npBand', () => {
  it('gives the NP factor for the number of people exposed', () => {
    expect(npBand(1)).toBe(1);
    expect(npBand(2)).toBe(1);
    expect(npBand(3)).toBe(2);
    expect(npBand(7)).toBe(2);
    expect(npBand(8)).toBe(4);
    expect(npBand(15)).toBe(4);
    expect(npBand(16)).toBe(8);
    expect(npBand(50)).toBe(8);
    expect(npBand(51)).toBe(12);
    expect(npKey(51)).toBe('over_50');
  });

  it('refuses a fractional head count', () => {
    expect(() => npBand(2.5)).toThrow(RangeError);
  });
});

describe('deriveHrnFactors', () => {
  // rule of thumb of ours: common practice, no source
  it('rates a quiet residential gate as unlikely, daily, 1–2 people', () => {
    const keys = deriveHrnFactors({
      usageClass: 1,
      childrenOrPetsPresent: false,
      pedestriansUseDriveway: false,
      publicAccess: false,
      severity: 'major_fracture',
    });
    expect(keys).toEqual({ lo: 'unlikely', fe: 'daily', dph: 'major_fracture', np: '1_2' });
  });

  it('raises likelihood and exposure for children, pedestrians and public access', () => {
    const keys = deriveHrnFactors({
      usageClass: 2,
      childrenOrPetsPresent: true,
      pedestriansUseDriveway: true,
      publicAccess: true,
      severity: 'fatality',
    });
    // unlikely + 3 steps = probable; hourly + 1 step = constantly; public access → 8–15
    expect(keys).toEqual({ lo: 'probable', fe: 'constantly', dph: 'fatality', np: '8_15' });
    expect(calculateHrn(keys).hrn).toBe(8 * 5 * 15 * 4);
  });

  it('lets the auditor override any default', () => {
    const keys = deriveHrnFactors(
      {
        usageClass: 1,
        childrenOrPetsPresent: true,
        pedestriansUseDriveway: false,
        publicAccess: false,
        severity: 'laceration',
      },
      { lo: 'certain' },
    );
    expect(keys.lo).toBe('certain');
    expect(keys.fe).toBe('daily');
  });
});
