/**
 * The input hash's writer (input-hash.ts) writes each known object of an input by its shape. These
 * tests hold its bytes to an independent deterministic writer from npm over thousands of generated
 * inputs, as parsed and as assembled (keys in any order), and over inputs bent out of shape:
 * members the schema does not know at every level, members set to undefined, values of the wrong
 * type, text that needs escaping, -0, keys that are not question keys.
 */
import { describe, expect, it } from 'vitest';
import {
  AssessmentInputSchema,
  compileRuleset,
  inputRecordJson,
  scoreParsed,
  type AssessmentInput,
} from '@/lib/rules';
import { generateInput } from './support/generate-input';
import { createPrng, type Prng } from './support/prng';
import { recordForm, referenceJson, reverseKeys } from './support/record-form';
import { shippedRulesets } from './support/shipped';

/** The members of an input the record form writes, besides its answers. */
const RECORD_MEMBERS = [
  'measurements',
  'entrapment',
  'forceTests',
  'swingGeometry',
  'hrnOverrides',
  'profile',
  'site',
];

const ODD_TEXT = [
  'Quote " and backslash \\',
  'tab\there',
  'é 😀 ⚠',
  '\u2028 line separator',
  'x'.repeat(300),
];

/** Every plain object inside a value, the value itself included. */
function objectsIn(value: unknown, found: Record<string, unknown>[] = []): Record<string, unknown>[] {
  if (Array.isArray(value)) for (const item of value) objectsIn(item, found);
  else if (value && typeof value === 'object') {
    found.push(value as Record<string, unknown>);
    for (const member of Object.values(value)) objectsIn(member, found);
  }
  return found;
}

/** Bends a few objects of the input out of the schema's shape, in ways the engine never refuses to hash. */
function bend(rng: Prng, input: AssessmentInput): void {
  const objects = objectsIn(input).slice(1); // not the top level: its members are the record form itself
  for (let n = rng.int(1, 4); n > 0; n--) {
    const target = rng.pick(objects);
    const keys = Object.keys(target);
    switch (rng.int(0, 6)) {
      case 0:
        target[rng.pick(['aaExtra', 'zzExtra', 'middle', 'note'])] = rng.pick([
          1.5,
          'more',
          true,
          null,
          [1, 'b'],
        ]);
        break;
      case 1:
        if (keys.length > 0) target[rng.pick(keys)] = undefined;
        break;
      case 2:
        if (keys.length > 0) target[rng.pick(keys)] = rng.pick(ODD_TEXT);
        break;
      case 3:
        if (keys.length > 0) target[rng.pick(keys)] = -0;
        break;
      case 4:
        target.note = rng.pick(ODD_TEXT);
        break;
      case 5:
        if (keys.length > 0) target[rng.pick(keys)] = { z: 1, a: [2, { y: 'é', b: -0 }] };
        break;
      default:
        target['0digit'] = 'odd key';
    }
  }
}

describe('the input record writer', () => {
  const rulesets = shippedRulesets();

  it('writes thousands of generated inputs, parsed and with their keys reversed, as an independent writer does', () => {
    const rng = createPrng(90_001);
    for (let i = 0; i < 3000; i++) {
      const ruleset = rng.pick(rulesets);
      const compiled = compileRuleset(ruleset.version, ruleset.contentSha256);
      const generated = generateInput(rng, ruleset.version);
      const parsed = AssessmentInputSchema.parse(generated);
      const expected = referenceJson(recordForm(parsed, ruleset.version, RECORD_MEMBERS));
      expect(inputRecordJson(parsed, compiled)).toBe(expected);
      expect(inputRecordJson(generated, compiled)).toBe(expected);
      expect(inputRecordJson(reverseKeys(parsed) as AssessmentInput, compiled)).toBe(expected);
    }
  }, 60_000);

  it('writes inputs with members the schema does not know, undefined members, odd text and -0 as an independent writer does', () => {
    const rng = createPrng(90_002);
    for (let i = 0; i < 3000; i++) {
      const ruleset = rng.pick(rulesets);
      const compiled = compileRuleset(ruleset.version, ruleset.contentSha256);
      const input = structuredClone(AssessmentInputSchema.parse(generateInput(rng, ruleset.version)));
      if (rng.chance(0.3))
        input.answers = {
          ...input.answers,
          [rng.pick(['zebra', 'aardvark', 'k9'])]: { value: rng.pick(ODD_TEXT) },
        };
      if (rng.chance(0.2))
        input.hrnOverrides = {
          'some.rule': { lo: 'likely', reason: rng.pick(ODD_TEXT) },
          ...input.hrnOverrides,
        };
      bend(rng, input);
      const expected = referenceJson(recordForm(input, ruleset.version, RECORD_MEMBERS));
      expect(inputRecordJson(input, compiled)).toBe(expected);
      expect(inputRecordJson(reverseKeys(input) as AssessmentInput, compiled)).toBe(expected);
    }
  }, 60_000);

  it('refuses a non-finite number anywhere in the input, naming where it is', () => {
    const ruleset = rulesets[0]!;
    const compiled = compileRuleset(ruleset.version, ruleset.contentSha256);
    const rng = createPrng(90_003);
    let input = AssessmentInputSchema.parse(generateInput(rng, ruleset.version));
    while (!input.forceTests || !input.measurements || Object.keys(input.measurements).length === 0)
      input = AssessmentInputSchema.parse(generateInput(rng, ruleset.version));
    const [first] = Object.keys(input.measurements);
    const bad = structuredClone(input);
    bad.measurements![first!]!.value = Number.POSITIVE_INFINITY;
    expect(() => inputRecordJson(bad, compiled)).toThrow(
      new RegExp(`non-finite number at \\$\\.measurements\\.${first}\\.value`),
    );
    const badForce = structuredClone(input);
    badForce.forceTests![0]!.gapMm = Number.NaN;
    expect(() => inputRecordJson(badForce, compiled)).toThrow(
      /non-finite number at \$\.forceTests\[0\]\.gapMm/,
    );
    const badProfile = structuredClone(input);
    (badProfile.profile as Record<string, unknown>).extra = Number.NaN;
    expect(() => scoreParsed(badProfile, ruleset)).toThrow(/non-finite number at \$\.profile\.extra/);
  });
});
