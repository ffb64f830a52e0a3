/**
 * Amendments as pure edits of a ruleset document: version labels, the draft copy, and each kind
 * of change with the request field a refused change is reported at.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { contentSha256, loadRulesetFile, validateRuleset, type RulesetVersion } from '@/lib/rules';
import type { LocalRule } from '@/lib/api/rulesets';
import { amendmentContent, applyAmendment, localFamilyTitle, nextLocalVersionLabel } from '@/lib/server/ruleset-edits';

const shipped = loadRulesetFile(JSON.parse(fs.readFileSync(path.resolve(__dirname, '../../../rulesets/north-american-gate/2026.1.json'), 'utf8'))).version;
const draft = () => amendmentContent(shipped, contentSha256(shipped), { family: 'north-american-gate-local', familyTitle: 'Local', version: '2026.1-local.1' });

const keySwitch: LocalRule = {
  title: 'Fire service key switch',
  area: 'controls',
  severity: 'major',
  gateKinds: ['swing'],
  check: { kind: 'answer_yes', question: { section: 'controls', prompt: 'Is a key switch fitted?', whyItMatters: 'Fire crews need to get in.' } },
  harm: 'fatality',
  remediation: 'Fit one.',
  caution: 'Keep it.',
  reference: { standard: 'Eastholm County fire code', clause: '5.12' },
};

const edited = (document: RulesetVersion, ...args: Parameters<typeof applyAmendment> extends [unknown, ...infer R] ? R : never) => {
  const result = applyAmendment(document, ...args);
  if (!result.ok) throw new Error(JSON.stringify(result.problems));
  return result.content;
};

describe('version labels and titles', () => {
  it('numbers amendments of the same base version on from the highest', () => {
    expect(nextLocalVersionLabel('2026.1', [])).toBe('2026.1-local.1');
    expect(nextLocalVersionLabel('2026.1', ['2026.1-local.1', '2026.1-local.3', '2015.1-local.7'])).toBe('2026.1-local.4');
    expect(nextLocalVersionLabel('2026.1-local.2', ['2026.1-local.1', '2026.1-local.2'])).toBe('2026.1-local.3');
    expect(nextLocalVersionLabel('2026.12', ['2026.1-local.4'])).toBe('2026.12-local.1');
  });

  it('keeps a local family title within 160 characters', () => {
    expect(localFamilyTitle('A'.repeat(150), 'Quill Gates').length).toBe(160);
    expect(localFamilyTitle('Gates', 'Quill Gates')).toBe('Gates, as amended by Quill Gates');
  });
});

describe('the draft copy', () => {
  it('is the source renamed, pointing back at it, and valid', () => {
    const copy = draft();
    expect(copy.rules).toEqual(shipped.rules);
    expect(copy.derivedFrom).toEqual({ family: 'north-american-gate', version: '2026.1', contentSha256: contentSha256(shipped) });
    expect(validateRuleset(copy).ok).toBe(true);
  });
});

describe('applyAmendment', () => {
  it('changes a threshold value and keeps its unit and note', () => {
    const before = shipped.rules.find((r) => r.id === 'gaps.swing-bottom')!.params.minLargeGapMm;
    const after = edited(draft(), { rules: { 'gaps.swing-bottom': { params: { minLargeGapMm: 500 } } } }, shipped);
    expect(after.rules.find((r) => r.id === 'gaps.swing-bottom')!.params.minLargeGapMm).toEqual({ ...before, value: 500 });
  });

  it('refuses a threshold of the wrong type, a negative one, and unknown rules or params, each at its field', () => {
    const result = applyAmendment(
      draft(),
      { rules: { 'gaps.swing-bottom': { params: { minLargeGapMm: 'big', maxSmallGapMm: -1, widthMm: 3 } }, 'gaps.nothing': { enabled: false } } },
      shipped,
    );
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.problems.map((p) => p.field)).toEqual([
      'rules.gaps.swing-bottom.params.minLargeGapMm',
      'rules.gaps.swing-bottom.params.maxSmallGapMm',
      'rules.gaps.swing-bottom.params.widthMm',
      'rules.gaps.nothing',
    ]);
    expect(result.problems[0].message).toBe('must be a number in mm; the unit stays as the rule has it');
  });

  it('never changes the document it was given', () => {
    const document = draft();
    const snapshot = JSON.stringify(document);
    edited(document, { rules: { 'pinch.fixed-objects': { severity: 'minor', enabled: false } }, addRules: [keySwitch] }, shipped);
    expect(JSON.stringify(document)).toBe(snapshot);
  });

  it('adds a yes/no local requirement with its question, a local source and a generated id', () => {
    const after = edited(draft(), { addRules: [keySwitch] }, shipped);
    const rule = after.rules.at(-1)!;
    expect(rule).toMatchObject({ id: 'local.fire-service-key-switch', local: true, enabled: true, requires: ['answers.localFireServiceKeySwitch'] });
    expect(rule.condition).toEqual({ '==': [{ var: 'answers.localFireServiceKeySwitch' }, 'yes'] });
    expect(after.questions.at(-1)).toMatchObject({ key: 'localFireServiceKeySwitch', answerType: 'yes_no_na', section: 'controls', area: 'controls', gateKinds: ['swing'] });
    expect(after.sources.find((s) => s.id === rule.reference.source)).toMatchObject({ kind: 'local', title: 'Eastholm County fire code' });
    expect(validateRuleset(after).ok).toBe(true);
  });

  it('adds a measured requirement whose limit is a param in the canonical unit, with a key ending in that unit', () => {
    const after = edited(
      draft(),
      { addRules: [{ ...keySwitch, title: 'Fence height', check: { kind: 'at_least', question: { section: 'construction', prompt: 'How tall is the fence?', whyItMatters: 'Climbing.', measure: 'length' }, limit: 1800 } }] },
      shipped,
    );
    const rule = after.rules.at(-1)!;
    expect(rule.params).toEqual({ limit: { value: 1800, unit: 'mm' } });
    expect(rule.condition).toEqual({ '>=': [{ var: 'm.localFenceHeightMm' }, { var: 'params.limit' }] });
    expect(validateRuleset(after).ok).toBe(true);
  });

  it('gives a second rule of the same title its own id and question key', () => {
    const after = edited(draft(), { addRules: [keySwitch, keySwitch] }, shipped);
    expect(after.rules.slice(-2).map((r) => r.id)).toEqual(['local.fire-service-key-switch', 'local.fire-service-key-switch-2']);
    expect(after.questions.slice(-2).map((q) => q.key)).toEqual(['localFireServiceKeySwitch', 'localFireServiceKeySwitch2']);
    expect(after.sources.filter((s) => s.kind === 'local')).toHaveLength(1);
  });

  it('refuses to remove a shipped rule, and removes a local one with what only it used', () => {
    const refused = applyAmendment(draft(), { removeRules: ['pinch.fixed-objects'] }, shipped);
    expect(refused.ok ? [] : refused.problems.map((p) => p.field)).toEqual(['removeRules[0]']);
    const base = draft();
    const added = edited(base, { addRules: [keySwitch] }, shipped);
    const removed = edited(added, { removeRules: ['local.fire-service-key-switch'] }, shipped);
    expect(removed).toEqual(base);
  });
});
