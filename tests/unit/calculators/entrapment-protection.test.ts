import { z } from 'zod';
import { describe, expect, it } from 'vitest';
import {
  applicableEntrapmentEdition,
  assessEntrapmentProtection,
  type EntrapmentProtectionInput,
  type FittedDevice,
} from '@/lib/rules/calculators/entrapment-protection';
import { UL325_PRE2016_ENTRAPMENT_TABLE } from '@/lib/rules/calculators/ul325-entrapment-types';

const device = (type: FittedDevice['type'], monitored = true): FittedDevice => ({ type, monitored });

/** A residential slide gate with an entrapment zone when closing only. */
function slideGate(
  closing: FittedDevice[],
  overrides: Partial<EntrapmentProtectionInput> = {},
): EntrapmentProtectionInput {
  return {
    gateKind: 'slide',
    usageClass: 1,
    automaticClosing: false,
    manufacturedOn: '2018-03-01',
    devices: { opening: [], closing },
    entrapmentZones: { opening: false, closing: true },
    ...overrides,
  };
}

describe('edition', () => {
  it('applies the 2016 rules to operators made from 12 Jan 2016', () => {
    // UL 325 revision effective 2016-01-12 (secondary source: trade press, DASMA TDS 353 as quoted)
    expect(applicableEntrapmentEdition('2016-01-12')).toBe('2016');
    expect(applicableEntrapmentEdition('2016-01-11')).toBe('pre-2016');
    expect(applicableEntrapmentEdition('2016-01-12T08:00:00Z')).toBe('2016');
  });

  it('lets an explicit choice win over the date', () => {
    expect(applicableEntrapmentEdition('2020-01-01', 'pre-2016')).toBe('pre-2016');
  });

  it('leaves the edition open without a date', () => {
    const result = assessEntrapmentProtection(
      slideGate([device('A'), device('B1')], { manufacturedOn: null }),
    );
    expect(result.applicableEdition).toBeNull();
    expect(result.compliant).toBeNull();
  });

  it('refuses a date that is not a real ISO date', () => {
    expect(() => applicableEntrapmentEdition('12/01/2016')).toThrow(RangeError);
    expect(() => applicableEntrapmentEdition('2016-02-30')).toThrow(RangeError);
    // Gregorian leap rule (ISO 8601): 2000 and 2024 have 29 February, 1900 and 2100 do not
    expect(applicableEntrapmentEdition('2000-02-29')).toBe('pre-2016');
    expect(applicableEntrapmentEdition('2024-02-29T07:30:00Z')).toBe('2016');
    expect(() => applicableEntrapmentEdition('1900-02-29')).toThrow(RangeError);
    expect(() => applicableEntrapmentEdition('2100-02-29')).toThrow(RangeError);
    expect(() => applicableEntrapmentEdition('2016-13-01')).toThrow(RangeError);
  });

  it("knows a real calendar date as zod's ISO date schema does (leap years included)", () => {
    // Reference: zod's z.iso.date() (ISO 8601 calendar dates, Gregorian leap rule: 2000 and 2024 leap, 1900 and 2100 not)
    const reference = z.iso.date();
    const pad = (n: number, width: number) => String(n).padStart(width, '0');
    for (const year of [1900, 1996, 2000, 2015, 2016, 2023, 2024, 2100]) {
      for (let month = 0; month <= 13; month++) {
        for (let day = 0; day <= 32; day++) {
          const date = `${pad(year, 4)}-${pad(month, 2)}-${pad(day, 2)}`;
          const accepted = (() => {
            try {
              applicableEntrapmentEdition(date);
              return true;
            } catch {
              return false;
            }
          })();
          expect(accepted, date).toBe(reference.safeParse(date).success);
        }
      }
    }
  });
});

describe('2016 rules', () => {
  // UL 325 from 2016: two independent means, monitored externals, E not counted (secondary source, verify)
  it('accepts inherent sensing plus a monitored photo-eye', () => {
    const result = assessEntrapmentProtection(slideGate([device('A'), device('B1')]));
    expect(result.applicableEdition).toBe('2016');
    expect(result.compliant).toBe(true);
    expect(result.byEdition['2016'].closing).toMatchObject({
      compliant: true,
      reasons: [],
      countedTypes: ['A', 'B1'],
    });
  });

  it('fails inherent sensing alone as needing two types', () => {
    const closing = assessEntrapmentProtection(slideGate([device('A')])).byEdition['2016'].closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['needs_two_types']);
  });

  it('does not count an unmonitored photo-eye', () => {
    const closing = assessEntrapmentProtection(slideGate([device('A'), device('B1', false)])).byEdition[
      '2016'
    ].closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['needs_two_types', 'unmonitored_external']);
    expect(closing.countedTypes).toEqual(['A']);
  });

  it('does not count two photo-eyes as two types', () => {
    const closing = assessEntrapmentProtection(slideGate([device('B1'), device('B1')])).byEdition['2016']
      .closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['needs_two_types', 'same_type_twice']);
  });

  it('does not count an audio alarm (type E)', () => {
    const closing = assessEntrapmentProtection(slideGate([device('A'), device('E')])).byEdition['2016']
      .closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['needs_two_types', 'type_e_not_counted']);
  });

  it('does not count constant-pressure control (type D) on a gate that closes automatically', () => {
    // UL 325: type D not with automatic closing (secondary source)
    const input = slideGate([device('A'), device('D')], { automaticClosing: true });
    const closing = assessEntrapmentProtection(input).byEdition['2016'].closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['needs_two_types', 'd_with_auto_close']);
    const manual = assessEntrapmentProtection(slideGate([device('A'), device('D')])).byEdition['2016']
      .closing;
    expect(manual.compliant).toBe(true);
  });

  it('does not count a clutch (type C) on a slide gate but does on a swing gate', () => {
    // carried over from the earlier table: C only for swing and barrier arm (from memory, verify)
    const slide = assessEntrapmentProtection(slideGate([device('A'), device('C')])).byEdition['2016'].closing;
    expect(slide.compliant).toBe(false);
    expect(slide.reasons).toContain('type_not_allowed_for_kind');
    const swing = assessEntrapmentProtection(slideGate([device('A'), device('C')], { gateKind: 'swing' }));
    expect(swing.byEdition['2016'].closing.compliant).toBe(true);
  });

  it('reports a device that does not count even when the direction complies', () => {
    const closing = assessEntrapmentProtection(slideGate([device('A'), device('B2'), device('E')])).byEdition[
      '2016'
    ].closing;
    expect(closing.compliant).toBe(true);
    expect(closing.reasons).toEqual(['type_e_not_counted']);
  });

  it('needs nothing in a direction without an entrapment zone', () => {
    const result = assessEntrapmentProtection(slideGate([device('A'), device('B1')]));
    expect(result.byEdition['2016'].opening).toMatchObject({
      entrapmentZone: false,
      compliant: true,
      reasons: [],
    });
  });

  it('judges each direction with an entrapment zone on its own', () => {
    const input = slideGate([device('A'), device('B1')], {
      entrapmentZones: { opening: true, closing: true },
      devices: { opening: [device('A')], closing: [device('A'), device('B1')] },
    });
    const result = assessEntrapmentProtection(input);
    expect(result.byEdition['2016'].opening.compliant).toBe(false);
    expect(result.byEdition['2016'].closing.compliant).toBe(true);
    expect(result.compliant).toBe(false);
  });
});

describe('pre-2016 table', () => {
  // UL 325 Table 30A.1 as in REFERENCES.md (secondary source, editions differ)
  const old = (closing: FittedDevice[], overrides: Partial<EntrapmentProtectionInput> = {}) =>
    assessEntrapmentProtection(slideGate(closing, { manufacturedOn: '2012-05-01', ...overrides }));

  it('keeps the table as data', () => {
    expect(UL325_PRE2016_ENTRAPMENT_TABLE.slide_lift_pivot[1]).toEqual({
      primary: ['A'],
      secondary: ['B1', 'B2', 'D'],
    });
    expect(UL325_PRE2016_ENTRAPMENT_TABLE.swing_barrier[4].secondary).toContain('E');
  });

  it('accepts a class I slide gate with A primary and an unmonitored B2 secondary', () => {
    // monitoring was not yet required before 2016
    const result = old([device('A'), device('B2', false)]);
    expect(result.applicableEdition).toBe('pre-2016');
    expect(result.byEdition['pre-2016'].closing).toMatchObject({
      compliant: true,
      assignment: { primary: 'A', secondary: 'B2' },
    });
    expect(result.compliant).toBe(true);
    expect(result.byEdition['2016'].closing.compliant).toBe(false);
  });

  it('fails a class I slide gate protected only by photo-eyes: B1 may not be primary', () => {
    const closing = old([device('B1'), device('B2')]).byEdition['pre-2016'].closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['primary_not_allowed']);
  });

  it('accepts photo-eye and edge on a class III slide gate, where B1 may be primary', () => {
    expect(old([device('B1'), device('B2')], { usageClass: 3 }).compliant).toBe(true);
  });

  it('fails a primary without a secondary', () => {
    expect(old([device('A')]).byEdition['pre-2016'].closing.reasons).toEqual(['needs_secondary']);
  });

  it('does not let one type serve as both primary and secondary', () => {
    // class III swing: A is allowed in both columns, but not twice
    const closing = old([device('A'), device('A')], { gateKind: 'swing', usageClass: 3 }).byEdition[
      'pre-2016'
    ].closing;
    expect(closing.compliant).toBe(false);
    expect(closing.reasons).toEqual(['same_type_both_roles']);
  });

  it('counts an audio alarm as secondary on a class IV slide gate', () => {
    expect(old([device('A'), device('E')], { usageClass: 4 }).compliant).toBe(true);
    expect(old([device('A'), device('E')], { usageClass: 1 }).byEdition['pre-2016'].closing.reasons).toEqual([
      'needs_secondary',
      'type_not_allowed_for_kind',
    ]);
  });

  it('accepts a class I swing gate with clutch and constant-pressure control', () => {
    expect(old([device('C'), device('D')], { gateKind: 'swing' }).compliant).toBe(true);
  });

  it('does not count type D when the gate closes automatically', () => {
    const result = old([device('C'), device('D')], { gateKind: 'swing', automaticClosing: true });
    expect(result.compliant).toBe(false);
    // C alone is left, and it cannot be primary and secondary at once
    expect(result.byEdition['pre-2016'].closing.reasons).toEqual([
      'same_type_both_roles',
      'd_with_auto_close',
    ]);
  });

  it('reports no devices in a direction that needs protection', () => {
    expect(old([]).byEdition['pre-2016'].closing.reasons).toEqual(['no_devices']);
  });

  it('leaves an overhead pivot gate open because the table does not name it', () => {
    const closing = old([device('A'), device('B1')], { gateKind: 'overhead_pivot' }).byEdition['pre-2016']
      .closing;
    expect(closing.compliant).toBeNull();
    expect(closing.reasons).toEqual(['kind_not_in_table']);
  });
});
