import jsonLogic from 'json-logic-js';
import { describe, expect, it } from 'vitest';
import { buildFacts, compileRuleset } from '@/lib/rules';
import { generateInput } from './support/generate-input';
import { createPrng, type Prng } from './support/prng';
import { shippedRulesets } from './support/shipped';

// Reference: json-logic-js 2 `apply` over the facts with the rule's params under `params`.
// The compiled closures (params folded in as constants) must give identical values.

/** Knocks out or scrambles a few facts so nulls, strings and absent branches are exercised too. */
function scramble(rng: Prng, facts: Record<string, unknown>): void {
  for (const group of Object.values(facts)) {
    if (!group || typeof group !== 'object') continue;
    for (const key of Object.keys(group)) {
      if (!rng.chance(0.05)) continue;
      (group as Record<string, unknown>)[key] = rng.pick([null, '', 'yes', 0, '12', true, undefined]);
    }
  }
}

describe.each(shippedRulesets().map((r) => [`${r.version.family} ${r.version.version}`, r] as const))(
  'compiled conditions of %s',
  (_label, ruleset) => {
    it('equal json-logic-js apply for every rule on 600 generated gates', () => {
      const compiled = compileRuleset(ruleset.version, ruleset.contentSha256);
      const rng = createPrng(0x1a7c4 + ruleset.version.rules.length);
      let evaluations = 0;
      const outcomes = new Set<string>();
      const mismatches: string[] = [];
      const same = (a: unknown, b: unknown) => a === b || JSON.stringify(a) === JSON.stringify(b);
      for (let i = 0; i < 600; i++) {
        const { facts } = buildFacts(generateInput(rng, ruleset.version));
        const data = structuredClone(facts) as unknown as Record<string, unknown>;
        if (i % 3 === 0) scramble(rng, data);
        for (const rule of compiled.rules) {
          const reference = { ...data, params: rule.paramValues };
          const expected = jsonLogic.apply(rule.rule.condition as never, reference);
          const actual = rule.condition(data);
          if (!same(actual, expected))
            mismatches.push(`${rule.rule.id} on gate ${i}: ${String(actual)} vs ${String(expected)}`);
          outcomes.add(`${rule.rule.id}:${String(expected)}`);
          if (rule.appliesWhen) {
            const when = rule.appliesWhen(data);
            const whenExpected = jsonLogic.apply(rule.rule.appliesWhen as never, reference);
            if (!same(when, whenExpected)) mismatches.push(`${rule.rule.id} appliesWhen on gate ${i}`);
          }
          evaluations += 1;
        }
      }
      expect(mismatches).toEqual([]);
      expect(evaluations).toBe(600 * compiled.rules.length);
      // The generated gates must drive conditions both ways, or the comparison proves little.
      const bothWays = compiled.rules.filter(
        (r) => outcomes.has(`${r.rule.id}:true`) && outcomes.has(`${r.rule.id}:false`),
      );
      expect(bothWays.length).toBeGreaterThan(compiled.rules.length * 0.8);
    }, 60_000);
  },
);

describe('compiled ruleset cache', () => {
  it('compiles a version once and returns the same compiled object for equal content', () => {
    const [first] = shippedRulesets();
    const a = compileRuleset(first!.version, first!.contentSha256);
    expect(compileRuleset(first!.version)).toBe(a);
    expect(compileRuleset(structuredClone(first!.version))).toBe(a);
  });
});
