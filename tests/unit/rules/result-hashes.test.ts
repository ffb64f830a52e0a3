/**
 * Results must not change under the engine's feet: the SHA-256 of each result below was taken
 * with the engine as it was before the answers and choices became one map (generated inputs
 * scored with score(); archive-style records built from a gate and stored documents and scored
 * as submit scored them). The same facts must give the same result bytes, input hash included,
 * so a signed result can always be reproduced from its stored documents.
 */
import { describe, expect, it } from 'vitest';
import { assembleInput, resultSha256, score, scoreParsed } from '@/lib/rules';
import { sampleDocuments, sampleGate } from '../../support/archive-samples';
import golden from './fixtures/result-hashes.json';
import { generateInput } from './support/generate-input';
import { createPrng } from './support/prng';
import { shippedRulesets } from './support/shipped';

const rulesets = shippedRulesets();

describe('results as they were signed', () => {
  it('gives the same result SHA-256 for generated inputs as before answers and choices merged', () => {
    const rng = createPrng(golden.generated.seed);
    const got: string[] = [];
    for (let i = 0; i < golden.generated.count; i++) {
      const ruleset = rng.pick(rulesets);
      const input = generateInput(rng, ruleset.version);
      if (i % 4 === 0) {
        const yesNo = ruleset.version.questions.find(
          (q) => q.answerType === 'yes_no_na' && input.answers?.[q.key],
        );
        if (yesNo)
          input.answers![yesNo.key] = { ...input.answers![yesNo.key]!, note: 'Seen from the road; é 😀 "q"' };
      }
      got.push(resultSha256(score(input, ruleset)).slice(0, 16));
    }
    expect(got).toEqual(golden.generatedResultSha256);
  }, 60_000);

  it('gives the same result SHA-256 for records assembled from a gate and stored documents', () => {
    const prng = createPrng(golden.archived.seed);
    const got: string[] = [];
    for (let i = 0; i < golden.archived.count; i++) {
      const loaded = rulesets[i % rulesets.length]!;
      const gate = { ...sampleGate(prng), usageClass: 1 + (i % 4) };
      if (i % 5 === 0) Object.assign(gate, { weightKg: null, entered: {} });
      // Documents of one version scored against another too, as the impact list does.
      const documents = sampleDocuments(
        prng,
        rulesets[(i * 7) % rulesets.length]!.version,
        i % 3 === 0 ? 0.6 : 0.97,
      );
      const { input, missing } = assembleInput(gate as never, documents as never);
      expect(missing).toEqual([]);
      got.push(resultSha256(scoreParsed(input, loaded)).slice(0, 16));
    }
    expect(got).toEqual(golden.archivedResultSha256);
  }, 60_000);
});
