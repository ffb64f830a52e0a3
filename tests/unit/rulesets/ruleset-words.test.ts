/** A rule's condition and thresholds in plain words, in the organisation's unit system. */
import { describe, expect, it } from 'vitest';
import { describeCondition, factName, formatParam, keyWords } from '@/lib/vocabulary';

describe('formatParam', () => {
  it('shows a length in mm to a metric organisation and in feet and inches to an imperial one', () => {
    // 16 in = 406.4 mm and 6 ft = 1828.8 mm exactly (NIST SP 811: 1 in = 25.4 mm).
    expect(formatParam({ value: 406.4, unit: 'mm' })).toBe('406.4 mm');
    expect(formatParam({ value: 1828.8, unit: 'mm' }, 'metric')).toBe('1828.8 mm');
    expect(formatParam({ value: 1828.8, unit: 'mm' }, 'imperial')).toBe('6 ft');
    expect(formatParam({ value: 406.4, unit: 'mm' }, 'imperial')).toBe('16 in');
    // Not on a 1/16 in: rounded, and says so.
    expect(formatParam({ value: 300, unit: 'mm' }, 'imperial')).toBe('about 11-13/16 in');
  });

  it('shows forces, counts, angles and percentages in the organisation system', () => {
    expect(formatParam({ value: 400, unit: 'N' })).toBe('400 N');
    expect(formatParam({ value: 400, unit: 'N' }, 'imperial')).toBe('89.9 lbf');
    expect(formatParam({ value: 2, unit: 'count' })).toBe('2');
    expect(formatParam({ value: 45, unit: 'deg' })).toBe('45°');
    expect(formatParam({ value: 5, unit: '%' })).toBe('5 %');
  });
});

describe('names', () => {
  it('turns keys and fact paths into words', () => {
    expect(keyWords('fixedObjectClearanceMm')).toBe('fixed object clearance');
    expect(keyWords('typeDWithAutoClose')).toBe('type d with auto close');
    expect(factName('m.placardsSide1')).toBe('placards side 1');
    expect(factName('site.childrenOrPetsPresent')).toBe('children or pets present');
    expect(factName('calc.entrapment.closing.compliant2016')).toBe('entrapment › closing › compliant 2016');
  });
});

describe('describeCondition', () => {
  const params = { minClearanceMm: { value: 406.4, unit: 'mm' }, fingerSafeBelowMm: { value: 4, unit: 'mm' } };

  it('reads comparisons against params with their units', () => {
    expect(describeCondition({ '>=': [{ var: 'm.fixedObjectClearanceMm' }, { var: 'params.minClearanceMm' }] }, params)).toBe(
      'fixed object clearance is at least 406.4 mm',
    );
    expect(
      describeCondition(
        { '>=': [{ var: 'm.fixedObjectClearanceMm' }, { var: 'params.minClearanceMm' }] },
        params,
        'imperial',
      ),
    ).toBe('fixed object clearance is at least 16 in');
  });

  it('reads answers and yes/no facts as the answer, and combines with all of / any of', () => {
    const logic = { or: [{ '==': [{ var: 'answers.hingeSideGuarded' }, 'yes'] }, { '<': [{ var: 'm.hingeGapMm' }, { var: 'params.fingerSafeBelowMm' }] }] };
    expect(describeCondition(logic, params)).toBe('any of: (hinge side guarded: yes) or (hinge gap is less than 4 mm)');
    expect(describeCondition({ and: [{ '==': [{ var: 'profile.operatorListed' }, true] }, { '!=': [{ var: 'answers.latchFitted' }, 'yes'] }] }, {})).toBe(
      'all of: (operator listed to the applicable safety standard: yes) and (latch fitted: not yes)',
    );
  });

  it('reads a three-way comparison as a range', () => {
    const range = { '<=': [{ var: 'params.low' }, { var: 'm.photoBeamHeightMm' }, { var: 'params.high' }] };
    expect(describeCondition(range, { low: { value: 300, unit: 'mm' }, high: { value: 700, unit: 'mm' } })).toBe('photo beam height is between 300 mm and 700 mm');
  });
});
