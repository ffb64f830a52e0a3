import { describe, expect, it } from 'vitest';
import { assessControls, assessSignage, UL325_CONTROL_MIN_DISTANCE_MM } from '@/lib/rules/calculators/controls-signage';

describe('assessControls', () => {
  // UL 325 installation instructions: 6 ft, no reach over/under/through, line of sight (secondary source, verify)
  it('passes a keypad 2 m from the gate, out of reach and in sight', () => {
    const result = assessControls({
      controlDistanceFromGateMm: 2000,
      canReachGateFromControl: false,
      inLineOfSight: true,
    });
    expect(result.pass).toBe(true);
    expect(result.distance).toMatchObject({ pass: true, limit: 1828.8, margin: 171.2 });
  });

  it('fails a push button 1 m from the gate', () => {
    const result = assessControls({
      controlDistanceFromGateMm: 1000,
      canReachGateFromControl: false,
      inLineOfSight: true,
    });
    expect(result.distance.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('passes exactly 6 ft and fails just under it', () => {
    expect(UL325_CONTROL_MIN_DISTANCE_MM).toBe(1828.8);
    expect(assessControls({ controlDistanceFromGateMm: 1828.8 }).distance.pass).toBe(true);
    expect(assessControls({ controlDistanceFromGateMm: 1828.7 }).distance.pass).toBe(false);
  });

  it('fails a control that can be worked by reaching through the gate', () => {
    const result = assessControls({
      controlDistanceFromGateMm: 2000,
      canReachGateFromControl: true,
      inLineOfSight: true,
    });
    expect(result.noReachThrough.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('fails a control with no view of the gate', () => {
    const result = assessControls({
      controlDistanceFromGateMm: 2000,
      canReachGateFromControl: false,
      inLineOfSight: false,
    });
    expect(result.lineOfSight.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('leaves the verdict open while answers are missing', () => {
    const result = assessControls({ controlDistanceFromGateMm: 2000 });
    expect(result.noReachThrough.pass).toBeNull();
    expect(result.pass).toBeNull();
  });

  it("takes a ruleset's own distance", () => {
    expect(assessControls({ controlDistanceFromGateMm: 2000 }, { minDistanceMm: 2500 }).distance.pass).toBe(false);
  });
});

describe('assessSignage', () => {
  // UL 325: at least two placards, one visible from each side (secondary source, verify)
  it('passes one placard on each side', () => {
    const result = assessSignage({ placardsGateSide1: 1, placardsGateSide2: 1 });
    expect(result.pass).toBe(true);
    expect(result.total).toEqual({ count: 2, pass: true });
  });

  it('fails two placards on the same side', () => {
    const result = assessSignage({ placardsGateSide1: 2, placardsGateSide2: 0 });
    expect(result.side2.pass).toBe(false);
    expect(result.total.pass).toBe(true);
    expect(result.pass).toBe(false);
  });

  it('fails a gate with a single placard', () => {
    const result = assessSignage({ placardsGateSide1: 1, placardsGateSide2: 0 });
    expect(result.total.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('leaves a side open until it is counted', () => {
    const result = assessSignage({ placardsGateSide1: 1, placardsGateSide2: null });
    expect(result.side2.pass).toBeNull();
    expect(result.total).toEqual({ count: null, pass: null });
    expect(result.pass).toBeNull();
    expect(assessSignage({ placardsGateSide1: 2 }).total.pass).toBe(true);
  });

  it('refuses a fractional or negative count', () => {
    expect(() => assessSignage({ placardsGateSide1: 1.5, placardsGateSide2: 1 })).toThrow(RangeError);
    expect(() => assessSignage({ placardsGateSide1: -1, placardsGateSide2: 1 })).toThrow(RangeError);
  });

  it("takes a ruleset's own minimums", () => {
    expect(assessSignage({ placardsGateSide1: 1, placardsGateSide2: 1 }, { minPerSide: 2 }).pass).toBe(false);
  });
});
