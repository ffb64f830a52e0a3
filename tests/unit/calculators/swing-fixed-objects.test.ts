import { describe, expect, it } from 'vitest';
import {
  ASTM_F2200_COVERED_OBJECT_MAX_FROM_PIVOT_MM,
  ASTM_F2200_FIXED_OBJECT_MIN_DISTANCE_MM,
  assessSwingClearance,
} from '@/lib/rules/calculators/swing-fixed-objects';
import { toMillimetres } from '@/lib/units';

describe('assessSwingClearance', () => {
  it('holds the ASTM F2200 limits as exact inch conversions', () => {
    // ASTM F2200, swing gates: 4 in and 16 in (secondary source, verify)
    expect(ASTM_F2200_COVERED_OBJECT_MAX_FROM_PIVOT_MM).toBeCloseTo(toMillimetres(4, 'in'), 9);
    expect(ASTM_F2200_FIXED_OBJECT_MIN_DISTANCE_MM).toBeCloseTo(toMillimetres(16, 'in'), 9);
  });

  it('passes a covered object 90 mm from the pivot and a wall 500 mm away', () => {
    // ASTM F2200, swing gates: covered object within 4 in of pivot (secondary source, verify)
    const result = assessSwingClearance({ coveredObjectFromPivotMm: 90, fixedObjectDistanceMm: 500 });
    expect(result.pass).toBe(true);
    expect(result.coveredObject).toEqual({ pass: true, rule: 'at_most', measured: 90, limit: 101.6, margin: 11.6 });
    expect(result.fixedObject).toEqual({ pass: true, rule: 'at_least', measured: 500, limit: 406.4, margin: 93.6 });
  });

  it('fails a covered object reaching 150 mm from the pivot', () => {
    const result = assessSwingClearance({ coveredObjectFromPivotMm: 150, fixedObjectDistanceMm: 500 });
    expect(result.coveredObject.pass).toBe(false);
    expect(result.coveredObject.margin).toBe(-48.4);
    expect(result.pass).toBe(false);
  });

  it('fails an open leaf 300 mm from a fixed object', () => {
    // ASTM F2200, swing gates: at least 16 in from any fixed object (secondary source, verify)
    const result = assessSwingClearance({ coveredObjectFromPivotMm: 50, fixedObjectDistanceMm: 300 });
    expect(result.fixedObject.pass).toBe(false);
    expect(result.fixedObject.margin).toBe(-106.4);
    expect(result.pass).toBe(false);
  });

  it('passes exactly 4 in and exactly 16 in', () => {
    const result = assessSwingClearance({ coveredObjectFromPivotMm: 101.6, fixedObjectDistanceMm: 406.4 });
    expect(result.coveredObject.pass).toBe(true);
    expect(result.fixedObject.pass).toBe(true);
    expect(assessSwingClearance({ coveredObjectFromPivotMm: 101.7 }).coveredObject.pass).toBe(false);
    expect(assessSwingClearance({ fixedObjectDistanceMm: 406.3 }).fixedObject.pass).toBe(false);
  });

  it('leaves unmeasured checks open as null', () => {
    const result = assessSwingClearance({ coveredObjectFromPivotMm: 90, fixedObjectDistanceMm: null });
    expect(result.fixedObject).toEqual({ pass: null, rule: 'at_least', measured: null, limit: 406.4, margin: null });
    expect(result.pass).toBeNull();
  });

  it('fails overall when one check fails even if the other is unmeasured', () => {
    expect(assessSwingClearance({ coveredObjectFromPivotMm: 200 }).pass).toBe(false);
  });

  it("takes a ruleset's own limits", () => {
    const result = assessSwingClearance({ fixedObjectDistanceMm: 450 }, { fixedObjectMinDistanceMm: 500 });
    expect(result.fixedObject.pass).toBe(false);
    expect(result.fixedObject.limit).toBe(500);
  });
});
