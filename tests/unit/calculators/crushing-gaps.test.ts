import { describe, expect, it } from 'vitest';
import {
  assessCrushingGap,
  assessHingeGap,
  DHF_FINGER_SAFE_GAP_MM,
  ISO13854_MIN_GAP_MM,
} from '@/lib/rules/calculators/crushing-gaps';

describe('assessCrushingGap', () => {
  it('uses the EN ISO 13854 minimum gaps', () => {
    // ISO 13854 Table 1 via AUVA safety-distances page (values of EN 349; secondary source, verify)
    expect(ISO13854_MIN_GAP_MM).toEqual({
      body: 500,
      head: 300,
      leg: 180,
      foot: 120,
      arm: 120,
      hand: 100,
      toes: 50,
      finger: 25,
    });
    // DHF TS 011: fingers kept out under 8 mm (secondary source)
    expect(DHF_FINGER_SAFE_GAP_MM).toBe(8);
  });

  it('flags a 30 mm gap as crushing everything but fingers', () => {
    // ISO 13854 Table 1 via AUVA: finger 25 mm is cleared, toes 50 mm is not
    const result = assessCrushingGap(30);
    expect(result.isCrushHazard).toBe(true);
    expect(result.fingerSafe).toBe(false);
    expect(result.partsAtRisk).toEqual(['body', 'head', 'leg', 'foot', 'arm', 'hand', 'toes']);
  });

  it('flags a 20 mm gap as a finger trap', () => {
    expect(assessCrushingGap(20).partsAtRisk).toContain('finger');
  });

  it('treats a gap equal to a part minimum gap as clearing that part', () => {
    // ISO 13854: the minimum gap itself is sufficient
    expect(assessCrushingGap(25).partsAtRisk).not.toContain('finger');
    expect(assessCrushingGap(24.9).partsAtRisk).toContain('finger');
    expect(assessCrushingGap(300).partsAtRisk).toEqual(['body']);
    expect(assessCrushingGap(299.9).partsAtRisk).toEqual(['body', 'head']);
  });

  it('accepts a gap of 500 mm or more as no crush hazard', () => {
    const result = assessCrushingGap(500);
    expect(result.isCrushHazard).toBe(false);
    expect(result.partsAtRisk).toEqual([]);
    expect(assessCrushingGap(499.9).partsAtRisk).toEqual(['body']);
  });

  it('accepts a gap under 8 mm as finger-safe', () => {
    // DHF TS 011: under 8 mm keeps fingers out (secondary source)
    const result = assessCrushingGap(7.9);
    expect(result.fingerSafe).toBe(true);
    expect(result.isCrushHazard).toBe(false);
    expect(result.partsAtRisk).toEqual([]);
  });

  it('treats exactly 8 mm as not finger-safe', () => {
    // DHF wording is "under 8 mm"
    const result = assessCrushingGap(8);
    expect(result.fingerSafe).toBe(false);
    expect(result.isCrushHazard).toBe(true);
  });

  it("takes a ruleset's own limits", () => {
    const result = assessCrushingGap(10, { fingerSafeBelowMm: 12, minGapsMm: { body: 600 } });
    expect(result.fingerSafe).toBe(true);
    expect(assessCrushingGap(550, { minGapsMm: { body: 600 } }).partsAtRisk).toEqual(['body']);
    expect(assessCrushingGap(550, { minGapsMm: { body: 600 } }).gapClearingAllPartsMm).toBe(600);
  });

  it('refuses a negative or missing gap', () => {
    expect(() => assessCrushingGap(-1)).toThrow(RangeError);
    expect(() => assessCrushingGap(Number.NaN)).toThrow(RangeError);
  });
});

describe('assessHingeGap', () => {
  // DHF TS 011 hinge side: under 4 mm or over 25 mm (secondary source, verify)
  it('flags a 12 mm hinge gap as a finger trap', () => {
    const result = assessHingeGap(12);
    expect(result.isFingerTrap).toBe(true);
    expect(result.safe).toBe(false);
    expect(result.verdict).toBe('finger_trap');
  });

  it('accepts a 3 mm hinge gap as too narrow for fingers', () => {
    expect(assessHingeGap(3)).toMatchObject({ safe: true, verdict: 'too_narrow_for_fingers' });
  });

  it('accepts a 30 mm hinge gap as clear of fingers', () => {
    expect(assessHingeGap(30)).toMatchObject({ safe: true, verdict: 'clear_of_fingers' });
  });

  it('flags exactly 4 mm and exactly 25 mm as traps', () => {
    expect(assessHingeGap(4).isFingerTrap).toBe(true);
    expect(assessHingeGap(25).isFingerTrap).toBe(true);
    expect(assessHingeGap(3.9).isFingerTrap).toBe(false);
    expect(assessHingeGap(25.1).isFingerTrap).toBe(false);
  });

  it("takes a ruleset's own limits", () => {
    expect(assessHingeGap(30, { fingerClearAboveMm: 32 }).isFingerTrap).toBe(true);
  });
});
