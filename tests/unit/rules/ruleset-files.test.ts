import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { HAZARD_AREAS, validateRuleset } from '@/lib/rules';
import { RULESETS_DIR, shippedRulesetFiles, shippedRulesets } from './support/shipped';

describe('shipped ruleset files', () => {
  it('ships two families: the North American one in three versions, the European one in two', () => {
    const versions = shippedRulesets().map((r) => `${r.version.family}@${r.version.version}`);
    expect(versions).toEqual([
      'european-powered-gate@2026.1',
      'european-powered-gate@2026.2',
      'north-american-gate@2015.1',
      'north-american-gate@2026.1',
      'north-american-gate@2026.2',
    ]);
  });

  it.each(shippedRulesetFiles().map((f) => [f.slice(RULESETS_DIR.length + 1), f]))(
    '%s validates against the schema with no problems',
    (_name, file) => {
      const result = validateRuleset(readFileSync(file, 'utf8'));
      expect(result.ok ? [] : result.problems).toEqual([]);
    },
  );

  it.each(shippedRulesets().map((r) => [r.file, r]))(
    '%s lives at rulesets/<family>/<version>.json',
    (file, r) => {
      expect(file).toBe(`${r.version.family}/${r.version.version}.json`);
    },
  );

  it.each(shippedRulesets().map((r) => [r.file, r]))(
    '%s has 35–60 rules covering every hazard area for swing and slide gates',
    (_f, r) => {
      expect(r.version.rules.length).toBeGreaterThanOrEqual(35);
      expect(r.version.rules.length).toBeLessThanOrEqual(60);
      for (const kind of ['swing', 'slide'] as const) {
        const covered = new Set(
          r.version.rules.filter((rule) => rule.appliesTo.gateKinds.includes(kind)).map((rule) => rule.area),
        );
        expect(
          [...HAZARD_AREAS].filter((area) => !covered.has(area)),
          `${kind} gates`,
        ).toEqual([]);
      }
    },
  );

  it.each(shippedRulesets().map((r) => [r.file, r]))(
    '%s marks every reference as checked, secondary, from memory or common practice',
    (_f, r) => {
      const unmarked = r.version.rules
        .filter((rule) => !/verify|common practice/.test(rule.reference.note ?? ''))
        .map((rule) => rule.id);
      expect(unmarked).toEqual([]);
      for (const rule of r.version.rules) {
        expect(rule.reference.standard.length, rule.id).toBeGreaterThan(2);
        expect(rule.reference.clause.length, rule.id).toBeGreaterThan(2);
      }
    },
  );

  it.each(shippedRulesets().map((r) => [r.file, r]))(
    '%s says on every critical rule that the assessment never replaces a qualified person',
    (_f, r) => {
      const bare = r.version.rules
        .filter((rule) => rule.severity === 'critical' && !rule.caution.includes('never replaces'))
        .map((rule) => rule.id);
      expect(bare).toEqual([]);
    },
  );

  it.each(shippedRulesets().map((r) => [r.file, r]))(
    '%s keeps numbers in params: no bare number in a condition',
    (_f, r) => {
      const bareNumbers = (node: unknown): number[] =>
        typeof node === 'number'
          ? [node]
          : Array.isArray(node)
            ? node.flatMap(bareNumbers)
            : node && typeof node === 'object'
              ? Object.values(node).flatMap(bareNumbers)
              : [];
      const offenders = r.version.rules
        .filter(
          (rule) =>
            bareNumbers(rule.condition).length > 0 || bareNumbers(rule.appliesWhen ?? null).length > 0,
        )
        .map((rule) => rule.id);
      expect(offenders).toEqual([]);
    },
  );
});
