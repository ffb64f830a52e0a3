import { describe, expect, it } from 'vitest';
import type { RulesetQuestion } from '@/lib/rules';
import {
  buildEngineInput,
  mergeDocuments,
  type AssessmentDocuments,
  type GateForScoring,
} from '@/lib/server/assessment-input';

const question = (
  key: string,
  answerType: RulesetQuestion['answerType'],
  options?: string[],
): RulesetQuestion => ({
  key,
  section: 'hinge_side',
  area: 'pinch',
  prompt: `${key}?`,
  whyItMatters: 'Because.',
  answerType,
  gateKinds: ['swing'],
  ...(options ? { options: options.map((value) => ({ value, label: value })) } : {}),
});

const questions = [
  question('hingeSideGuarded', 'yes_no_na'),
  question('hingeGapMm', 'length'),
  question('wireGaugeAwg', 'choice', ['awg12', 'awg14']),
  question('installedOn', 'date'),
];
const empty: AssessmentDocuments = { answers: {}, measurements: {}, observations: {} };
const site = {
  pedestriansUseDriveway: false,
  childrenOrPetsPresent: true,
  publicAccess: false,
  slopeAcrossSwing: false,
};

const gate: GateForScoring = {
  kind: 'swing',
  leaves: 'single',
  openingDirection: 'push_to_open',
  widthMm: 3658,
  heightMm: 1500,
  weightKg: null,
  entered: { width: { value: 12, unit: 'ft' } },
  operator: { listed: true, automaticClosing: false },
  usageClass: 1,
};

describe('mergeDocuments', () => {
  it('merges answers, removes nulls and computes canonical measurements', () => {
    const first = mergeDocuments(
      empty,
      {
        answers: { hingeSideGuarded: { value: 'no' } },
        measurements: { hingeGapMm: { value: 1.5, unit: 'in' } },
      },
      questions,
    );
    expect(first.ok).toBe(true);
    if (!first.ok) return;
    // 1.5 in = 38.1 mm exactly (NIST SP 811).
    expect(first.value.measurements.hingeGapMm).toEqual({ value: 1.5, unit: 'in', canonical: 38.1 });
    const second = mergeDocuments(
      first.value,
      {
        answers: { hingeSideGuarded: null, wireGaugeAwg: { value: 'awg14' } },
        measurements: { hingeGapMm: null },
      },
      questions,
    );
    expect(second.ok && second.value).toEqual({
      answers: { wireGaugeAwg: { value: 'awg14' } },
      measurements: {},
      observations: {},
    });
  });

  it('names every answer that does not fit its question', () => {
    const result = mergeDocuments(
      empty,
      {
        answers: {
          hingeSideGuarded: { value: 'sometimes' },
          wireGaugeAwg: { value: 'awg99' },
          installedOn: { value: '2024-02-30' },
          unknownThing: { value: 'yes' },
          hingeGapMm: { value: 'yes' },
        },
        measurements: { hingeSideGuarded: { value: 1, unit: 'mm' }, hingeGapMm: { value: 10, unit: 'kg' } },
      },
      questions,
    );
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.errors.map((e) => e.field).sort()).toEqual([
      'answers.hingeGapMm',
      'answers.hingeSideGuarded.value',
      'answers.installedOn.value',
      'answers.unknownThing',
      'answers.wireGaugeAwg.value',
      'measurements.hingeGapMm.unit',
      'measurements.hingeSideGuarded',
    ]);
  });

  it('merges observations and checks the merged whole in the engine’s shapes', () => {
    const merged = mergeDocuments(
      { ...empty, observations: { site: { publicAccess: true } } },
      { observations: { site: { slopeAcrossSwing: true } } },
      questions,
    );
    expect(merged.ok && merged.value.observations).toEqual({
      site: { publicAccess: true, slopeAcrossSwing: true },
    });
    const wrong = mergeDocuments(empty, { observations: { site: { publicAccess: 'yes' } } }, questions);
    expect(!wrong.ok && wrong.errors.map((e) => e.field)).toEqual(['observations.site.publicAccess']);
  });
});

describe('buildEngineInput', () => {
  it('takes the profile from the gate, with each dimension as entered and in canonical units', () => {
    const built = buildEngineInput(gate, {
      ...empty,
      answers: { hingeSideGuarded: { value: 'yes' }, wireGaugeAwg: { value: 'awg12' } },
      observations: { site },
    });
    expect(built.ok).toBe(true);
    if (!built.ok) return;
    // 12 ft = 3657.6 mm exactly: the canonical value follows what was entered, not the rounded column.
    expect(built.value.profile).toMatchObject({
      kind: 'swing',
      usageClass: 1,
      leafWidth: { value: 12, unit: 'ft', canonical: 3657.6 },
      leafHeight: { value: 1500, unit: 'mm', canonical: 1500 },
    });
    expect(built.value.profile.leafWeight).toBeUndefined();
    // The one stored answer map, as it is: the engine knows which questions are yes/no.
    expect(built.value.answers).toEqual({
      hingeSideGuarded: { value: 'yes' },
      wireGaugeAwg: { value: 'awg12' },
    });
  });

  it('says where to record what the engine needs, in the API’s own field names', () => {
    const built = buildEngineInput(
      { ...gate, operator: {} },
      { ...empty, observations: { site: { publicAccess: true } } },
    );
    expect(built.ok).toBe(false);
    if (built.ok) return;
    expect(built.errors).toEqual(
      expect.arrayContaining([
        { field: 'gate.operator.listed', message: 'is required before submitting' },
        { field: 'gate.operator.automaticClosing', message: 'is required before submitting' },
        { field: 'observations.site.pedestriansUseDriveway', message: 'is required before submitting' },
      ]),
    );
  });
});
