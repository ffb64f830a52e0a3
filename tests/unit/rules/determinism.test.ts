import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import {
  AnswerSchema,
  AssessmentInputSchema,
  canonicalJson,
  compileRuleset,
  inputRecordJson,
  HrnOverrideSchema,
  MeasuredValueSchema,
  resultSha256,
  score,
  sha256Hex,
  scoreParsed,
} from '@/lib/rules';
import { euSwingGate } from './fixtures/european-powered-gate';
import { naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, len, YES } from './support/inputs';
import { generateInput } from './support/generate-input';
import { createPrng } from './support/prng';
import { recordForm, referenceJson, reverseKeys } from './support/record-form';
import { shipped, shippedRulesets } from './support/shipped';

describe('canonicalJson', () => {
  it('sorts keys at every depth and drops undefined members', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { z: 0, y: null }], c: undefined } })).toBe(
      '{"a":{"d":[1,{"y":null,"z":0}]},"b":1}',
    );
  });

  it('writes -0 as 0 and refuses NaN and Infinity', () => {
    expect(canonicalJson([-0])).toBe('[0]');
    expect(() => canonicalJson({ peak: Number.NaN })).toThrow(/non-finite number at \$\.peak/);
    expect(() => canonicalJson([Infinity])).toThrow(/non-finite/);
  });
});

describe('sha256Hex', () => {
  it('matches the published SHA-256 test vectors', () => {
    // FIPS 180-2, Appendix B.1 and B.2 (one-block and two-block messages)
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256Hex('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
    // UTF-8 bytes, as node's streaming Hash reads a string
    expect(sha256Hex('Tür ⚠ 50 mm')).toBe(
      createHash('sha256').update(Buffer.from('Tür ⚠ 50 mm', 'utf8')).digest('hex'),
    );
  });
});

describe('scoring determinism', () => {
  const failing = applyPatch(naSwingGate(), {
    answers: { controlReachThrough: YES },
    measurements: { hingeGapMm: len(12) },
  });

  it('gives byte-identical canonical JSON and SHA-256 for the same input scored twice', () => {
    const ruleset = shipped('north-american-gate', '2026.1');
    const first = score(failing, ruleset);
    const second = score(structuredClone(failing), ruleset);
    expect(canonicalJson(second)).toBe(canonicalJson(first));
    expect(resultSha256(second)).toBe(resultSha256(first));
    expect(resultSha256(first)).toMatch(/^[0-9a-f]{64}$/);
  });

  it('gives the same SHA-256 when the input keys arrive in another order', () => {
    for (const [input, ruleset] of [
      [failing, shipped('north-american-gate', '2026.1')],
      [euSwingGate(), shipped('european-powered-gate', '2026.1')],
    ] as const) {
      const reordered = reverseKeys(input);
      expect(JSON.stringify(reordered)).not.toBe(JSON.stringify(input));
      expect(resultSha256(score(reordered, ruleset))).toBe(resultSha256(score(input, ruleset)));
    }
  });

  it('gives the same SHA-256 with a ruleset whose keys arrive in another order', () => {
    const ruleset = shipped('north-american-gate', '2026.1');
    const reordered = reverseKeys(structuredClone(ruleset.version)) as typeof ruleset.version;
    expect(resultSha256(score(failing, reordered))).toBe(resultSha256(score(failing, ruleset)));
  });

  it('changes the SHA-256 when one measurement changes', () => {
    const ruleset = shipped('north-american-gate', '2026.1');
    const other = applyPatch(failing, { measurements: { hingeGapMm: len(13) } });
    expect(resultSha256(score(other, ruleset))).not.toBe(resultSha256(score(failing, ruleset)));
  });

  it('pins the ruleset identity and the input hash in the result', () => {
    const ruleset = shipped('north-american-gate', '2026.1');
    const result = score(failing, ruleset);
    expect(result.ruleset).toEqual({
      family: 'north-american-gate',
      version: '2026.1',
      contentSha256: ruleset.contentSha256,
    });
    // The input hash is the SHA-256 of the input's record form (answers split into yes/no answers
    // and choices by the version's questions) as a deterministic writer from npm prints it.
    const parsed = AssessmentInputSchema.parse(failing);
    expect(result.inputSha256).toBe(
      createHash('sha256')
        .update(referenceJson(recordForm(parsed, ruleset.version))!, 'utf8')
        .digest('hex'),
    );
  });

  it('hashes generated inputs in their record form as an independent deterministic writer writes it, through score() and scoreParsed()', () => {
    const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');
    const rng = createPrng(7_340_033);
    const rulesets = shippedRulesets();
    for (let i = 0; i < 300; i++) {
      const ruleset = rng.pick(rulesets);
      const input = AssessmentInputSchema.parse(generateInput(rng, ruleset.version));
      if (i % 3 === 0)
        input.answers = {
          ...input.answers,
          // A key the version does not ask goes with the choices, as submit always put it.
          zebraCrossing: { value: 'no', note: 'Quote " backslash \\ tab \t, é, 😀' },
        };
      if (i % 5 === 0 && input.measurements) {
        const [first] = Object.keys(input.measurements);
        if (first) input.measurements[first] = { ...input.measurements[first]!, value: -0, canonical: -0 };
      }
      const expected = referenceJson(recordForm(input, ruleset.version))!;
      const compiled = compileRuleset(ruleset.version, ruleset.contentSha256);
      expect(inputRecordJson(input, compiled)).toBe(expected);
      // What score() hashes: what the schema built (keys in canonical order).
      expect(inputRecordJson(AssessmentInputSchema.parse(input), compiled)).toBe(expected);
      expect(score(input, ruleset).inputSha256).toBe(sha256(expected));
      expect(scoreParsed(input, ruleset).inputSha256).toBe(sha256(expected));
      // Key order does not matter: the same input with every key order reversed hashes the same.
      expect(scoreParsed(reverseKeys(input) as typeof input, ruleset).inputSha256).toBe(sha256(expected));
    }
  }, 30_000); // five shipped versions, 300 inputs each scored three times: seconds on a busy 2-core host

  it('declares every object of the input schema to zod in sorted key order, so parsed keys come out canonical', () => {
    const unsorted: string[] = [];
    const seen = new Set<unknown>();
    const walk = (schema: unknown, path: string): void => {
      if (!schema || typeof schema !== 'object' || seen.has(schema)) return;
      seen.add(schema);
      const def = (schema as { _zod?: { def?: Record<string, unknown> } })._zod?.def;
      if (!def) return;
      if (def.type === 'object') {
        const keys = Object.keys(def.shape as object);
        if (keys.join() !== [...keys].sort().join()) unsorted.push(path);
        for (const k of keys) walk((def.shape as Record<string, unknown>)[k], `${path}.${k}`);
      }
      for (const child of ['innerType', 'element', 'valueType', 'in', 'out']) walk(def[child], path);
    };
    walk(AssessmentInputSchema, '$');
    // Record values sit behind the dictionary records' transform: walk them by name.
    for (const [name, schema] of Object.entries({
      AnswerSchema,
      MeasuredValueSchema,
      HrnOverrideSchema,
    }))
      walk(schema, name);
    expect(seen.size).toBeGreaterThan(20);
    expect(unsorted).toEqual([]);
  });

  it('refuses to hash a non-finite number in an input handed over already parsed, naming where it is', () => {
    const input = AssessmentInputSchema.parse(failing);
    input.measurements!.hingeGapMm!.canonical = Number.NaN;
    expect(() => scoreParsed(input, shipped('north-american-gate', '2026.1'))).toThrow(
      /non-finite number at \$\.measurements\.hingeGapMm\.canonical/,
    );
  });
});
