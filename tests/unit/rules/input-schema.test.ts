import { describe, expect, it } from 'vitest';
import { AssessmentInputError, AssessmentInputSchema, isIsoDate, score } from '@/lib/rules';
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

  it('rejects an unknown unit and an empty answer', () => {
    const input = applyPatch(naSwingGate(), {
      measurements: { hingeGapMm: { value: 1, unit: 'furlong', canonical: 1 } },
      answers: { placardsLegible: { value: '  ' } },
    });
    expect(issuesOf(input)).toEqual([
      'answers.placardsLegible.value: must not be empty',
      'measurements.hingeGapMm.unit: unknown unit "furlong"',
    ]);
  });

  it('takes yes/no and choice answers in the one answers map, each checked by its question when scoring', () => {
    const version = shipped('north-american-gate', '2026.1');
    const measured = version.version.questions.find((q) => q.answerType === 'length')!;
    const input = applyPatch(naSwingGate(), {
      answers: {
        placardsLegible: { value: 'maybe' },
        wireGaugeAwg: choice('awg14'),
        [measured.key]: choice('yes'),
      },
      measurements: { [measured.key]: REMOVE },
    });
    expect(issuesOf(input)).toEqual([]);
    let thrown: unknown;
    try {
      score(input, version);
    } catch (error) {
      thrown = error;
    }
    expect(thrown).toBeInstanceOf(AssessmentInputError);
    expect((thrown as AssessmentInputError).issues).toEqual(
      expect.arrayContaining([
        { path: 'answers.placardsLegible.value', message: 'answer yes, no or na' },
        {
          path: `answers.${measured.key}`,
          message: `"${measured.key}" is a measured question (length): send it under measurements`,
        },
      ]),
    );
    expect(
      (thrown as AssessmentInputError).issues.some((i) => i.path.startsWith('answers.wireGaugeAwg')),
    ).toBe(false);
    // The same choice among the yes/no answers, with the others put right, scores.
    const fine = applyPatch(naSwingGate(), { answers: { wireGaugeAwg: choice('awg14') } });
    expect(score(fine, version).findings.length).toBeGreaterThan(0);
  });

  it('knows a calendar date written YYYY-MM-DD from one that is not (date answers, checked without zod)', () => {
    for (const good of ['2024-02-29', '2000-02-29', '2023-12-31', '1999-01-01'])
      expect([good, isIsoDate(good)]).toEqual([good, true]);
    for (const bad of [
      '2023-02-29',
      '1900-02-29',
      '2023-04-31',
      '2023-13-01',
      '2023-00-10',
      '2023-1-01',
      '23-01-01',
      ' 2023-01-01',
      '2023-01-00',
    ])
      expect([bad, isIsoDate(bad)]).toEqual([bad, false]);
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
    });
    const issues = issuesOf(input);
    expect(issues).toEqual([
      'profile.leafWidth.unit: leafWidth must be entered as a length',
      'swingGeometry.bMm: the rear pivot cannot sit on the hinge axis',
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
      answers: { wireGaugeAwg: choice('awg8') },
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
          path: 'answers.wireGaugeAwg.value',
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
