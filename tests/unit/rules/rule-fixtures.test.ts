import { describe, expect, it } from 'vitest';
import { score } from '@/lib/rules';
import { applyPatch } from './support/inputs';
import { FAMILY_FIXTURES } from './support/fixtures';
import { shippedRulesets } from './support/shipped';

// Every shipped rule is proven both ways: a passing and a failing input laid over a base gate
// that passes everything. The threshold's source is named beside each fixture.

describe.each(shippedRulesets().map((r) => [`${r.version.family} ${r.version.version}`, r] as const))(
  'rules of %s',
  (_label, ruleset) => {
    const fixtures = FAMILY_FIXTURES[ruleset.version.family];

    it('has fixtures for its family', () => {
      expect(fixtures, `no fixtures module for ${ruleset.version.family}`).toBeDefined();
    });

    it('has a passing and a failing fixture for every rule', () => {
      const missing = ruleset.version.rules.map((r) => r.id).filter((id) => !fixtures?.rules[id]);
      expect(missing).toEqual([]);
    });

    it.each(['swing', 'slide'] as const)('clears a %s gate built to pass every rule', (gate) => {
      const result = score(fixtures!.base[gate](), ruleset);
      expect(
        result.findings
          .filter((f) => f.outcome !== 'pass' && f.outcome !== 'n/a')
          .map((f) => `${f.ruleId}: ${f.outcome}`),
      ).toEqual([]);
      expect(result.verdict).toBe('clear');
    });

    for (const rule of ruleset.version.rules) {
      const fixture = fixtures?.rules[rule.id];
      if (!fixture) continue;
      it(`${rule.id} passes the passing input and fails the failing one (${fixture.source})`, () => {
        const base = fixtures!.base[fixture.gate]();
        const outcomeOf = (patch: Record<string, unknown>) => {
          const result = score(applyPatch(base, patch), ruleset);
          const finding = result.findings.find((f) => f.ruleId === rule.id);
          return { outcome: finding?.outcome, missing: finding?.missing };
        };
        expect(outcomeOf(fixture.pass)).toEqual({ outcome: 'pass', missing: [] });
        expect(outcomeOf(fixture.fail)).toEqual({ outcome: 'fail', missing: [] });
      });
    }
  },
);
