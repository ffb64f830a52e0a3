import { describe, expect, it } from 'vitest';
import { loadRulesetFile, RulesetValidationError, validateRuleset, type RulesetVersion } from '@/lib/rules';
import { shipped } from './support/shipped';

const base = (): RulesetVersion => structuredClone(shipped('north-american-gate', '2026.1').version);
const problemsOf = (doc: unknown) => {
  const result = validateRuleset(doc);
  return result.ok ? [] : result.problems;
};
const ruleIndex = (doc: RulesetVersion, id: string) => doc.rules.findIndex((r) => r.id === id);

describe('ruleset schema and cross-references', () => {
  it('refuses a condition that reads an undefined param, naming the rule path', () => {
    const doc = base();
    const i = ruleIndex(doc, 'controls.distance');
    doc.rules[i]!.condition = { '>=': [{ var: 'm.controlDistanceMm' }, { var: 'params.minDistanceInches' }] };
    expect(problemsOf(doc)).toContainEqual({
      path: `rules[${i}].condition`,
      message: '"params.minDistanceInches" is not defined in this rule\'s params',
    });
  });

  it('refuses a condition that reads a question the version never asks', () => {
    const doc = base();
    const i = ruleIndex(doc, 'controls.distance');
    doc.rules[i]!.condition = { '>=': [{ var: 'm.keypadDistanceMm' }, { var: 'params.minDistanceMm' }] };
    expect(problemsOf(doc).map((p) => p.message)).toContain(
      '"m.keypadDistanceMm" is neither a question of this version nor a known fact',
    );
  });

  it('refuses a condition reading a fact that is neither required nor optional', () => {
    const doc = base();
    const i = ruleIndex(doc, 'controls.distance');
    doc.rules[i]!.requires = [];
    expect(problemsOf(doc)).toContainEqual({
      path: `rules[${i}].condition`,
      message:
        'the condition reads "m.controlDistanceMm" but it is in neither requires nor optional (a missing value would read as null)',
    });
  });

  it('refuses duplicate rule ids and question keys', () => {
    const doc = base();
    doc.rules.push(structuredClone(doc.rules[0]!));
    doc.questions.push(structuredClone(doc.questions[0]!));
    const messages = problemsOf(doc).map((p) => `${p.path}: ${p.message}`);
    expect(messages).toContain(
      `rules[${doc.rules.length - 1}]: "${doc.rules[0]!.id}" appears more than once in rules`,
    );
    expect(messages).toContain(
      `questions[${doc.questions.length - 1}]: "${doc.questions[0]!.key}" appears more than once in questions`,
    );
  });

  it('refuses operators outside the compiled set', () => {
    const doc = base();
    const i = ruleIndex(doc, 'controls.line-of-sight');
    doc.rules[i]!.condition = { substr: [{ var: 'answers.controlLineOfSight' }, 0, 1] };
    expect(problemsOf(doc).map((p) => p.message)).toContain('operator "substr" is not supported in rulesets');
  });

  it('refuses unknown keys (strict objects) with the path of the key', () => {
    const doc = base() as unknown as Record<string, unknown>;
    (doc.rules as Array<Record<string, unknown>>)[0]!.weight = 3;
    const problems = problemsOf(doc);
    expect(problems.some((p) => p.path === 'rules[0]' && /weight/.test(p.message))).toBe(true);
  });

  it('refuses a measured question whose key does not name its unit', () => {
    const doc = base();
    const i = doc.questions.findIndex((q) => q.key === 'controlDistanceMm');
    doc.questions[i]!.answerType = 'force';
    expect(problemsOf(doc).map((p) => `${p.path}: ${p.message}`)).toContain(
      `questions[${i}].key: a force in N needs a key ending in "N"`,
    );
  });

  it('refuses a derived fact whose source questions the version never asks', () => {
    const doc = base();
    doc.questions = doc.questions.filter((q) => q.key !== 'operatorCurrentA');
    const i = ruleIndex(doc, 'power.voltage-drop');
    expect(problemsOf(doc)).toContainEqual({
      path: `rules[${i}].requires`,
      message:
        '"calc.power.dropPercent" is worked out from "m.operatorCurrentA", which this version never asks',
    });
  });

  it('refuses a rule for slide gates reading a question only asked at swing gates', () => {
    const doc = base();
    const i = ruleIndex(doc, 'pinch.hinge-side');
    doc.rules[i]!.appliesTo.gateKinds = ['swing', 'slide'];
    expect(problemsOf(doc)).toContainEqual({
      path: `rules[${i}].appliesTo.gateKinds`,
      message: 'rule reads "m.hingeGapMm" but question "hingeGapMm" is not asked for slide gates',
    });
  });

  it('refuses a threshold without its unit', () => {
    const doc = base() as unknown as { rules: Array<{ id: string; params: Record<string, unknown> }> };
    const rule = doc.rules.find((r) => r.id === 'controls.distance')!;
    rule.params.minDistanceMm = { value: 1828.8 };
    expect(
      problemsOf(doc).some((p) =>
        p.path.startsWith(`rules[${doc.rules.indexOf(rule)}].params.minDistanceMm`),
      ),
    ).toBe(true);
  });

  it('throws a readable error listing every problem from loadRulesetFile', () => {
    const doc = base();
    doc.version = 'latest';
    doc.rules[0]!.severity = 'urgent' as never;
    expect(() => loadRulesetFile(doc, 'bad.json')).toThrowError(RulesetValidationError);
    try {
      loadRulesetFile(doc, 'bad.json');
    } catch (error) {
      expect((error as Error).message).toContain('version: must look like "2026.1" or "2026.1-local.2"');
      expect((error as RulesetValidationError).problems.map((p) => p.path)).toContain('rules[0].severity');
    }
  });

  it('accepts a local amendment: changed params and severity, a rule turned off and a local rule added', () => {
    const doc = base();
    doc.version = '2026.1-local.1';
    doc.family = 'acme-local-gate';
    const distance = doc.rules[ruleIndex(doc, 'controls.distance')]!;
    distance.params.minDistanceMm = { value: 2000, unit: 'mm', note: 'local code' };
    distance.severity = 'critical';
    doc.rules[ruleIndex(doc, 'handover.remote-codes')]!.enabled = false;
    doc.rules.push({
      ...structuredClone(distance),
      id: 'controls.local-keypad-height',
      title: 'Keypad out of reach of the gate',
      local: true,
    });
    expect(problemsOf(doc)).toEqual([]);
  });

  it('gives the same content SHA-256 for the file and its parsed, reordered form', () => {
    const loaded = shipped('european-powered-gate', '2026.1');
    const reordered = Object.fromEntries(Object.entries(structuredClone(loaded.version)).reverse());
    expect(loadRulesetFile(reordered).contentSha256).toBe(loaded.contentSha256);
  });
});
