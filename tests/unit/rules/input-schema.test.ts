import { describe, expect, it } from 'vitest';
import { AssessmentInputError, AssessmentInputSchema, score } from '@/lib/rules';
import { naSlideGate, naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, choice, force, len, REMOVE } from './support/inputs';
import { shipped } from './support/shipped';

const issuesOf = (input: unknown) => {
  const parsed = AssessmentInputSchema.safeParse(input);
  return parsed.success ? [] : parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
};

describe('assessment input schema', () => {
  it('accepts the base swing and slide gates', () => {
    expect(issuesOf(naSwingGate())).toEqual([]);
    expect(issuesOf(naSlideGate())).toEqual([]);
  });

  it('rejects unknown keys at any level', () => {
    const input = applyPatch(naSwingGate(), {
      profile: { colour: 'green' },
      answers: { placardsLegible: { value: 'yes', photo: 'x' } },
    });
    const issues = issuesOf(input);
    expect(issues.some((i) => i.startsWith('profile') && i.includes('colour'))).toBe(true);
    expect(issues.some((i) => i.startsWith('answers.placardsLegible') && i.includes('photo'))).toBe(true);
  });

  it('rejects a canonical value that does not match the entered one', () => {
    // 1 in = 25.4 mm exactly (NIST SP 811)
    const input = applyPatch(naSwingGate(), {
      measurements: { hingeGapMm: { value: 1, unit: 'in', canonical: 25 } },
    });
    expect(issuesOf(input)).toEqual([
      'measurements.hingeGapMm.canonical: 1 in is 25.4 in canonical units, not 25',
    ]);
  });

  it('rejects an unknown unit and an answer other than yes, no or na', () => {
    const input = applyPatch(naSwingGate(), {
      measurements: { hingeGapMm: { value: 1, unit: 'furlong', canonical: 1 } },
      answers: { placardsLegible: { value: 'maybe' } },
    });
    expect(issuesOf(input)).toEqual([
      'answers.placardsLegible.value: answer yes, no or na',
      'measurements.hingeGapMm.unit: unknown unit "furlong"',
    ]);
  });

  it('needs the opening direction of a swing gate', () => {
    expect(issuesOf(applyPatch(naSwingGate(), { profile: { openingDirection: REMOVE } }))).toEqual([
      'profile.openingDirection: a swing gate needs its opening direction',
    ]);
  });

  it('needs either samples or a summary for a force test, not both', () => {
    const input = applyPatch(naSlideGate(), {});
    input.forceTests = [{ location: 'closing_edge', direction: 'closing', gapMm: 300 }];
    expect(issuesOf(input)).toEqual([
      'forceTests.0.samples: give either the samples or the summary of the trace, not both',
    ]);
  });

  it('reports every cross-field problem with its path, and score() reports the same ones', () => {
    const input = applyPatch(naSwingGate(), {
      profile: { leafWidth: { value: 90, unit: 'kg', canonical: 90 } },
      swingGeometry: { aMm: 0, bMm: 0 },
      choices: { placardsLegible: choice('yes') },
    });
    const issues = issuesOf(input);
    expect(issues).toEqual([
      'profile.leafWidth.unit: leafWidth must be entered as a length',
      'swingGeometry.bMm: the rear pivot cannot sit on the hinge axis',
      'choices.placardsLegible: "placardsLegible" is answered both as yes/no and as a choice',
    ]);
    let thrown: unknown;
    try {
      score(input, shipped('north-american-gate', '2026.1'));
    } catch (error) {
      thrown = error;
    }
    expect(thrown).toBeInstanceOf(AssessmentInputError);
    expect((thrown as AssessmentInputError).issues.map((i) => `${i.path}: ${i.message}`)).toEqual(issues);
  });

  it('refuses, when scoring, a force entered for a length question and a choice it does not offer', () => {
    const input = applyPatch(naSwingGate(), {
      measurements: { hingeGapMm: force(10) },
      choices: { wireGaugeAwg: choice('awg8') },
    });
    expect(() => score(input, shipped('north-american-gate', '2026.1'))).toThrowError(AssessmentInputError);
    try {
      score(input, shipped('north-american-gate', '2026.1'));
    } catch (error) {
      expect((error as AssessmentInputError).issues).toEqual([
        {
          path: 'measurements.hingeGapMm.unit',
          message: '"hingeGapMm" is a length; "N" is not a unit of it',
        },
        {
          path: 'choices.wireGaugeAwg.value',
          message: '"awg8" is not one of awg10, awg12, awg14, awg16, awg18, other',
        },
      ]);
    }
  });

  it('refuses an HRN override naming a rule or level the version does not have', () => {
    const input = {
      ...naSwingGate(),
      hrnOverrides: { 'pinch.nowhere': { lo: 'sometimes', reason: 'seen' } },
    };
    expect(() => score(input, shipped('north-american-gate', '2026.1'))).toThrowError(
      /pinch.nowhere.*not a rule.*\n?.*"sometimes" is not a LO level/s,
    );
  });

  it('applies a valid HRN override and keeps its reason', () => {
    const input = applyPatch(naSwingGate(), { measurements: { hingeGapMm: len(12) } });
    input.hrnOverrides = { 'pinch.hinge-side': { lo: 'likely', reason: 'Children climb this gate daily' } };
    const hrn = score(input, shipped('north-american-gate', '2026.1')).findings.find(
      (f) => f.ruleId === 'pinch.hinge-side',
    )!.hrn!;
    // LO likely 10 × FE hourly 4 × DPH loss of one limb 6 × NP 1 = 240 (very high)
    expect(hrn).toMatchObject({
      value: 240,
      band: 'very_high',
      keys: { lo: 'likely' },
      overrideReason: 'Children climb this gate daily',
    });
  });
});
