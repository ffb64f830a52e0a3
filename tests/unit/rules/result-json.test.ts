import { describe, expect, it } from 'vitest';
import {
  AssessmentInputSchema,
  compileRuleset,
  loadRulesetFile,
  resultJson,
  score,
  type LoadedRuleset,
  type ScoreResult,
} from '@/lib/rules';
import { generateInput } from './support/generate-input';
import { createPrng } from './support/prng';
import { shipped, shippedRulesets } from './support/shipped';

/** The same object with every key order reversed, all the way down (as jsonb may hand a version back). */
function reverseKeys<T>(value: T): T {
  if (Array.isArray(value)) return value.map(reverseKeys) as T;
  if (value && typeof value === 'object')
    return Object.fromEntries(
      Object.entries(value)
        .reverse()
        .map(([k, v]) => [k, reverseKeys(v)]),
    ) as T;
  return value;
}

/** A shipped version amended locally: one rule's params changed and a local rule added. */
function amended(): LoadedRuleset {
  const doc = structuredClone(shipped('north-american-gate', '2026.2').version);
  doc.family = 'sample-local-gate';
  doc.version = '2026.2-local.1';
  const model = doc.rules.find((r) => r.enabled && Object.keys(r.params).length > 0)!;
  doc.rules.push({
    ...structuredClone(model),
    id: `${model.id}-local`,
    title: `${model.title} (local)`,
    local: true,
  });
  return loadRulesetFile(doc);
}

describe('resultJson', () => {
  it('writes the bytes JSON.stringify writes for generated results of every shipped version, an amended one and one with its keys reordered', () => {
    const rng = createPrng(90_210);
    const reordered = shipped('european-powered-gate', '2026.2');
    const rulesets = [
      ...shippedRulesets(),
      amended(),
      // Its own cache key: under the real one the compiled cache would hand back the shipped order.
      { version: reverseKeys(reordered.version), contentSha256: 'f'.repeat(64) },
    ];
    const outcomes = new Set<string>();
    let local = 0;
    let rated = 0;
    for (let i = 0; i < 400; i++) {
      const ruleset = rulesets[i % rulesets.length]!;
      const result = score(generateInput(rng, ruleset.version), ruleset);
      for (const f of result.findings) {
        outcomes.add(f.outcome);
        if (f.local) local++;
        if (f.hrn) rated++;
      }
      expect(resultJson(result, compileRuleset(ruleset.version, ruleset.contentSha256))).toBe(
        JSON.stringify(result),
      );
    }
    // The reordered version writes its rule text in its own key order.
    const input = generateInput(rng, reordered.version);
    expect(JSON.stringify(score(input, rulesets.at(-1)!))).not.toBe(JSON.stringify(score(input, reordered)));
    // The inputs reach every outcome, local rules and HRN ratings.
    expect([...outcomes].sort()).toEqual(['fail', 'n/a', 'needs_info', 'pass']);
    expect(local).toBeGreaterThan(0);
    expect(rated).toBeGreaterThan(0);
  }, 60_000); // seven versions, 400 inputs scored: seconds on a busy 2-core host

  it('writes a finding changed after scoring as it now stands', () => {
    const ruleset = shipped('european-powered-gate', '2026.2');
    const compiled = compileRuleset(ruleset.version, ruleset.contentSha256);
    const rng = createPrng(31);
    const fresh = () => score(AssessmentInputSchema.parse(generateInput(rng, ruleset.version)), ruleset);
    const changes: Array<(result: ScoreResult) => void> = [
      (r) => (r.findings[0] = { ...r.findings[0]!, title: 'Retitled' }),
      (r) => (r.findings[1] = { ...r.findings[1]!, params: { limit: { value: 1 } } }),
      (r) => (r.findings[2] = { ...r.findings[2]!, note: 'added' } as never),
      (r) => (r.findings[3] = { ...r.findings[3]!, hrn: undefined }),
      // The same members in another order.
      (r) => {
        const { ruleId, ...rest } = r.findings[4]!;
        r.findings[4] = { ...rest, ruleId };
      },
      (r) => (r.findings[5] = { ...r.findings[5]!, local: true }),
      (r) => (r.findings[6] = { ...r.findings[6]!, caution: undefined as never }),
      (r) => (r.findings[7] = undefined as never),
      (r) => r.findings.pop(),
      (r) => Object.assign(r, { extra: [1, undefined] }),
    ];
    for (const change of changes) {
      const result = fresh();
      change(result);
      expect(resultJson(result, compiled)).toBe(JSON.stringify(result));
    }
  });
});
