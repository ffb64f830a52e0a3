import { describe, expect, it } from 'vitest';
import { buildFacts, questionsToAsk } from '@/lib/rules';
import { euSwingGate } from './fixtures/european-powered-gate';
import { naSlideGate, naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, NO, REMOVE, YES } from './support/inputs';
import { shipped } from './support/shipped';

describe('buildFacts', () => {
  it('reads yes/no and choice answers under answers and canonical measurements under m', () => {
    const { facts } = buildFacts(naSwingGate());
    expect(facts.answers.placardsLegible).toBe('yes');
    expect(facts.answers.wireGaugeAwg).toBe('awg12');
    // 8 ft = 2438.4 mm (NIST SP 811 exact foot)
    expect(facts.m.controlDistanceMm).toBe(2438.4);
    expect(facts.profile).toMatchObject({
      kind: 'swing',
      leafHeightMm: 1828.8,
      operatorManufacturedOn: '2020-05-01',
    });
  });

  it('judges entrapment protection per direction under both UL 325 regimes', () => {
    // UL 325 (secondary source): swing class I, A + B1 closing, A + B2 opening, all monitored
    const { facts } = buildFacts(naSwingGate());
    expect(facts.calc.entrapment).toEqual({
      deviceCount: 4,
      zonesWithoutExternalSensor: 0,
      unmonitoredExternal: 0,
      typeDWithAutoClose: false,
      zonesFromMeasurements: 0,
      // a monitored edge (B2) is listed for the open side, opening: the fixed-object zone is protected
      fixedObjectZoneProtected: true,
      photoEyes: 1,
      edges: 1,
      rules2016: true,
      closing: {
        zone: true,
        countedTypes2016: 2,
        externalSensors: 1,
        monitoredSensors: 1,
        compliantPre2016: true,
        compliant2016: true,
      },
      opening: {
        zone: true,
        countedTypes2016: 2,
        externalSensors: 1,
        monitoredSensors: 1,
        compliantPre2016: true,
        compliant2016: true,
      },
    });
  });

  it('leaves derived facts out when their inputs are missing', () => {
    const { facts } = buildFacts(
      applyPatch(naSlideGate(), {
        entrapment: REMOVE,
        measurements: { supplyVoltageV: REMOVE, placardsSide1: REMOVE },
      }),
    );
    expect(facts.calc.entrapment).toBeUndefined();
    expect(facts.calc.power).toEqual({ chargingSourceCount: 1 });
    expect(facts.calc.signage).toBeUndefined();
    expect(facts.calc.geometry).toBeUndefined();
  });

  it('groups force tests by the EN 12453 gap zones and keeps the worst figures', () => {
    const { facts } = buildFacts(euSwingGate());
    // peaks 320/350/380 N at 50–500 mm, 900 N at 1000 mm (EN 12453 zones, secondary source)
    expect(facts.calc.force).toEqual({
      testCount: 4,
      rejectedTraces: 0,
      largeGapTests: 1,
      // EN 12445 measuring points (secondary source) with an accepted test, and the wide-gap point
      acceptedGapsMm: [50, 300, 500, 1000],
      worst: { peakN: 900, durationAbove150S: 0.4, staticN: 90, residualAt5sN: 10 },
      smallGapMaxPeakN: 380,
      largeGapMaxPeakN: 900,
    });
  });

  it('refuses a summary below the 50 mm measuring point as evidence, not as an error', () => {
    const input = euSwingGate();
    input.forceTests = [
      {
        location: 'closing_edge',
        direction: 'closing',
        gapMm: 30,
        summary: { peakN: 100, durationAbove150S: 0, staticN: 0, residualAt5sN: 0 },
      },
    ];
    const { facts, problems } = buildFacts(input);
    expect(facts.calc.force).toEqual({
      testCount: 0,
      rejectedTraces: 1,
      largeGapTests: 0,
      acceptedGapsMm: [],
    });
    expect(problems).toEqual([
      {
        path: 'forceTests[0]',
        code: 'gap_not_covered',
        message: 'A 30 mm gap is below the 50 mm measuring point',
      },
    ]);
  });

  it('produces JSON-serialisable facts that survive a round trip unchanged', () => {
    const { facts } = buildFacts(euSwingGate());
    expect(JSON.parse(JSON.stringify(facts))).toEqual(facts);
  });
});

describe('questionsToAsk', () => {
  it('shows follow-up questions only once their trigger is answered', () => {
    const version = shipped('north-american-gate', '2026.1').version;
    const without = questionsToAsk(
      applyPatch(naSwingGate(), { answers: { barbedTapeFitted: NO } }),
      version,
    ).map((q) => q.key);
    const withTape = questionsToAsk(
      applyPatch(naSwingGate(), { answers: { barbedTapeFitted: YES } }),
      version,
    ).map((q) => q.key);
    expect(without).not.toContain('barbedTapeHeightMm');
    expect(withTape).toContain('barbedTapeHeightMm');
  });

  it('asks only questions for the gate kind, in walk order', () => {
    const version = shipped('north-american-gate', '2026.1').version;
    const keys = questionsToAsk(naSlideGate(), version).map((q) => q.key);
    expect(keys).not.toContain('hingeGapMm');
    expect(keys).toContain('rollersGuarded');
    const sections = questionsToAsk(naSlideGate(), version).map((q) =>
      version.sections.findIndex((s) => s.key === q.section),
    );
    expect(sections).toEqual([...sections].sort((a, b) => a - b));
  });
});
