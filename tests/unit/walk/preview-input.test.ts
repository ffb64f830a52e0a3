/**
 * The walk-through builds the live preview's engine input on the device with the assembler the
 * server uses at submit (no zod); these tests hold it to the engine's own schema and scoring
 * with a shipped ruleset, so the preview and the submitted result read the same facts.
 */
import type { WalkDraft, WalkGate, WalkRuleset } from '@/lib/api/walk-through';
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { AssessmentInputSchema, buildFacts, loadRulesetFile, score, type RulesetVersion } from '@/lib/rules';
import { groupBySection, mergeNeeds, questionsToShow } from '@/lib/walk/model';
import { buildEngineInput } from '@/lib/server/assessment-input';
import { buildPreviewInput } from '@/lib/walk/score-input';

const file = JSON.parse(
  fs.readFileSync('rulesets/north-american-gate/2026.1.json', 'utf8'),
) as RulesetVersion;
const loaded = loadRulesetFile(file, 'north-american-gate 2026.1');
const ruleset: WalkRuleset = {
  family: file.family,
  version: file.version,
  title: file.familyTitle,
  sections: file.sections,
  areas: file.areas,
  questions: file.questions,
};

const gate: WalkGate = {
  id: '00000000-0000-4000-8000-000000000001',
  label: 'Driveway gate',
  kind: 'swing',
  leaves: 'single',
  openingDirection: 'pull_to_open',
  widthMm: 3658,
  heightMm: null,
  weightKg: 136,
  entered: { width: { value: 12, unit: 'ft' }, weight: { value: 300, unit: 'lb' } },
  operator: { listed: true, automaticClosing: false },
  usageClass: 1,
};

const site = {
  pedestriansUseDriveway: true,
  childrenOrPetsPresent: false,
  publicAccess: false,
  slopeAcrossSwing: false,
};

describe('the live preview input', () => {
  it('says what must be known before anything can be scored', () => {
    const { blockers } = buildPreviewInput(
      { ...gate, operator: {} },
      { answers: {}, measurements: {}, observations: { site: { publicAccess: true } } },
    );
    expect(blockers).toHaveLength(5);
    expect(blockers.join(' ')).toMatch(/people walk through/);
    expect(blockers.join(' ')).toMatch(/listed to the safety standard/);
    expect(blockers.join(' ')).toMatch(/automatic closing/);
  });

  it('hands over the stored answers as one map, keeps the gate as measured, and parses with the engine’s schema', () => {
    const documents: WalkDraft = {
      answers: {
        hingeSideGuarded: { value: 'yes', note: 'mesh guard' },
        wireGaugeAwg: { value: 'awg12' },
        retired: { value: 'yes' },
      },
      measurements: { hingeGapMm: { value: 2.25, unit: 'in', canonical: 57.15 } },
      observations: { site },
    };
    const { input, blockers } = buildPreviewInput(gate, documents);
    expect(blockers).toEqual([]);
    expect(input.answers).toEqual(documents.answers);
    expect((input.profile as Record<string, unknown>).leafWidth).toEqual({
      value: 12,
      unit: 'ft',
      canonical: 3657.6,
    });
    // What the device sends is what the server assembles from the same gate and documents.
    const sent = JSON.parse(JSON.stringify(input));
    expect(AssessmentInputSchema.safeParse(sent).success).toBe(true);
    expect(sent).toEqual(JSON.parse(JSON.stringify(buildEngineInput(gate, documents as never))).value);
    // The engine scores it (a key the version does not ask is ignored) and reads the choice as a fact.
    expect(score(sent, loaded).findings.length).toBeGreaterThan(0);
    expect(buildFacts(sent).facts.answers.wireGaugeAwg).toBe('awg12');
  });

  it('scores with the engine: the hinge-side gap the auditor measured decides its finding', () => {
    const hingeOutcome = (value: number, unit: 'mm' | 'in', canonical: number) =>
      score(
        buildPreviewInput(gate, {
          answers: {},
          measurements: { hingeGapMm: { value, unit, canonical } },
          observations: { site },
        }).input,
        loaded,
      ).findings.find((f) => f.ruleId === 'pinch.hinge-side')?.outcome;
    // The ruleset's own params: a finger is safe below 4 mm and clear above 25 mm.
    expect(hingeOutcome(3 / 8, 'in', 9.525)).toBe('fail');
    expect(hingeOutcome(3, 'mm', 3)).toBe('pass');
    expect(hingeOutcome(2.25, 'in', 57.15)).toBe('pass');
  });
});

describe('which questions the walk shows', () => {
  const empty: WalkDraft = { answers: {}, measurements: {}, observations: {} };

  it('asks a follow-up only once its trigger is answered', () => {
    expect(questionsToShow(ruleset, gate, empty).map((q) => q.key)).not.toContain('barbedTapeHeightMm');
    const after = questionsToShow(ruleset, gate, {
      ...empty,
      answers: { barbedTapeFitted: { value: 'yes' } },
    }).map((q) => q.key);
    expect(after).toContain('barbedTapeHeightMm');
  });

  it('follows the site context (slope across the swing asks for the clearance over the swing)', () => {
    const sloped = questionsToShow(ruleset, gate, {
      ...empty,
      observations: { site: { ...site, slopeAcrossSwing: true } },
    }).map((q) => q.key);
    expect(sloped).toContain('bottomClearanceOverSwingMm');
  });

  it('keeps the walk order of the sections and only this gate kind’s questions', () => {
    const shown = questionsToShow(ruleset, gate, empty);
    const order = ruleset.sections.map((s) => s.key);
    const ranks = shown.map((q) => order.indexOf(q.section));
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
    expect(shown.every((q) => q.gateKinds.includes('swing'))).toBe(true);
    const groups = groupBySection(ruleset, shown, new Set(['force_test']));
    expect(groups[0]?.key).toBe('approach_signs');
    expect(groups.map((g) => g.key)).toContain('force_test');
  });

  it('lists needed items with the same words once, with every rule waiting on them', () => {
    expect(
      mergeNeeds([
        { key: 'calc.entrapment.deviceCount', prompt: 'Entrapment zones', ruleIds: ['a'] },
        { key: 'calc.entrapment.zonesWithoutDevice', prompt: 'Entrapment zones', ruleIds: ['b', 'a'] },
        { key: 'm.hingeGapMm', prompt: 'Hinge gap', ruleIds: ['c'] },
      ]),
    ).toEqual([
      { key: 'calc.entrapment.deviceCount', prompt: 'Entrapment zones', ruleIds: ['a', 'b'] },
      { key: 'm.hingeGapMm', prompt: 'Hinge gap', ruleIds: ['c'] },
    ]);
  });
});
