import { describe, expect, it } from 'vitest';
import { assessSlideGate, type SlideGateInput } from '@/lib/rules/calculators/slide-gate';

/** A slide gate built the way ASTM F2200 asks: mesh to the top of a 1.8 m gate, guarded rollers, stops. */
const goodGate: SlideGateInput = {
  largestOpeningMm: 50,
  openingsGuardedToHeightMm: 1800,
  gateHeightMm: 1800,
  rollersGuarded: true,
  positiveStopsBothEnds: true,
  postGapMm: 5,
};

describe('assessSlideGate: openings', () => {
  it('passes a gate whose openings stop the 2-1/4 in sphere up to its top', () => {
    // ASTM F2200, slide gates: 2-1/4 in sphere, bottom to 72 in or top if lower (secondary source, verify)
    const result = assessSlideGate(goodGate);
    expect(result.pass).toBe(true);
    expect(result.openingSize).toMatchObject({ pass: true, limit: 57.15, margin: 7.15 });
    expect(result.guardZoneTopMm).toBe(1800);
  });

  it('fails an opening a 2-1/4 in sphere can pass through', () => {
    const result = assessSlideGate({ ...goodGate, largestOpeningMm: 60 });
    expect(result.openingSize.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('fails an opening exactly the size of the sphere and passes one just under', () => {
    // the opening must stop the sphere, so it has to be strictly smaller
    expect(assessSlideGate({ ...goodGate, largestOpeningMm: 57.15 }).openingSize.pass).toBe(false);
    expect(assessSlideGate({ ...goodGate, largestOpeningMm: 57.1 }).openingSize.pass).toBe(true);
  });

  it('fails a tall gate screened only to 48 in under the current edition', () => {
    // ASTM F2200 current: 72 in = 1828.8 mm (secondary source, verify)
    const result = assessSlideGate({ ...goodGate, gateHeightMm: 2400, openingsGuardedToHeightMm: 1219.2 });
    expect(result.guardZoneTopMm).toBe(1828.8);
    expect(result.guardedHeight).toMatchObject({ pass: false, limit: 1828.8, margin: -609.6 });
  });

  it('passes the same gate under a pre-2011 edition (48 in)', () => {
    // older ASTM F2200 editions: 48 in (secondary source, verify)
    const result = assessSlideGate({
      ...goodGate,
      gateHeightMm: 2400,
      openingsGuardedToHeightMm: 1219.2,
      edition: 'pre-2011',
    });
    expect(result.guardedHeight).toMatchObject({ pass: true, limit: 1219.2, margin: 0 });
  });

  it('asks for screening only up to the top of a gate lower than 72 in', () => {
    expect(
      assessSlideGate({ ...goodGate, gateHeightMm: 1500, openingsGuardedToHeightMm: 1500 }).guardedHeight.pass,
    ).toBe(true);
    expect(
      assessSlideGate({ ...goodGate, gateHeightMm: 1500, openingsGuardedToHeightMm: 1499 }).guardedHeight.pass,
    ).toBe(false);
  });

  it('leaves the guarded height open when a short screen cannot be judged without the gate height', () => {
    const result = assessSlideGate({ ...goodGate, gateHeightMm: null, openingsGuardedToHeightMm: 1500 });
    expect(result.guardedHeight.pass).toBeNull();
    expect(result.guardZoneTopMm).toBeNull();
    expect(
      assessSlideGate({ ...goodGate, gateHeightMm: null, openingsGuardedToHeightMm: 1900 }).guardedHeight.pass,
    ).toBe(true);
  });
});

describe('assessSlideGate: rollers and stops', () => {
  it('fails exposed rollers at ground level', () => {
    // ASTM F2200: exposed weight-bearing rollers up to 8 ft guarded (secondary source, verify)
    const result = assessSlideGate({ ...goodGate, rollersGuarded: false, rollersExposedBelowMm: 0 });
    expect(result.rollers.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('accepts unguarded rollers only above 8 ft', () => {
    expect(assessSlideGate({ ...goodGate, rollersGuarded: false, rollersExposedBelowMm: 2500 }).rollers.pass).toBe(
      true,
    );
    expect(assessSlideGate({ ...goodGate, rollersGuarded: false, rollersExposedBelowMm: 2438.4 }).rollers.pass).toBe(
      false,
    );
  });

  it('fails unguarded rollers of unknown height', () => {
    expect(assessSlideGate({ ...goodGate, rollersGuarded: false }).rollers.pass).toBe(false);
  });

  it('fails a gate without positive stops at both ends', () => {
    // ASTM F2200: positive stops at both ends (secondary source, verify)
    const result = assessSlideGate({ ...goodGate, positiveStopsBothEnds: false });
    expect(result.positiveStops.pass).toBe(false);
    expect(result.pass).toBe(false);
  });

  it('leaves the verdict open while an answer is missing', () => {
    expect(assessSlideGate({ ...goodGate, positiveStopsBothEnds: null }).pass).toBeNull();
    expect(assessSlideGate({ ...goodGate, rollersGuarded: undefined }).rollers.pass).toBeNull();
  });
});

describe('assessSlideGate: gap at the post', () => {
  it('marks a 200 mm gap at the post as an entrapment zone', () => {
    // UL 325 as quoted: slide gate, any gap under 16 in (secondary source, verify)
    const result = assessSlideGate({ ...goodGate, postGapMm: 200 });
    expect(result.postGap.entrapmentZone).toBe(true);
    expect(result.postGap.solidGateLimit.pass).toBe(false);
  });

  it('does not mark a gap of 16 in or more as an entrapment zone', () => {
    expect(assessSlideGate({ ...goodGate, postGapMm: 406.4 }).postGap.entrapmentZone).toBe(false);
    expect(assessSlideGate({ ...goodGate, postGapMm: 406.3 }).postGap.entrapmentZone).toBe(true);
  });

  it('accepts a solid gate at most 8 mm from its post', () => {
    // DHF TS 011: solid slide gate at most 8 mm from its post (secondary source)
    expect(assessSlideGate({ ...goodGate, postGapMm: 8 }).postGap.solidGateLimit.pass).toBe(true);
    expect(assessSlideGate({ ...goodGate, postGapMm: 8.1 }).postGap.solidGateLimit.pass).toBe(false);
  });

  it('leaves the post gap open when not measured', () => {
    expect(assessSlideGate({ ...goodGate, postGapMm: null }).postGap.entrapmentZone).toBeNull();
  });

  it("takes a ruleset's own limits", () => {
    const result = assessSlideGate({ ...goodGate, postGapMm: 10 }, { solidGatePostGapMaxMm: 12, sphereDiameterMm: 45 });
    expect(result.postGap.solidGateLimit.pass).toBe(true);
    expect(result.openingSize.pass).toBe(false);
  });
});
