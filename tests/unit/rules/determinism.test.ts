import { describe, expect, it } from 'vitest';
import { canonicalJson, resultSha256, score } from '@/lib/rules';
import { euSwingGate } from './fixtures/european-powered-gate';
import { naSwingGate } from './fixtures/north-american-gate';
import { applyPatch, len, YES } from './support/inputs';
import { shipped } from './support/shipped';

/** The same object with every key order reversed, all the way down. */
function reverseKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reverseKeys);
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).reverse().map(([k, v]) => [k, reverseKeys(v)]));
  return value;
}

describe('canonicalJson', () => {
  it('sorts keys at every depth and drops undefined members', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { z: 0, y: null }], c: undefined } })).toBe('{"a":{"d":[1,{"y":null,"z":0}]},"b":1}');
  });

  it('writes -0 as 0 and refuses NaN and Infinity', () => {
    expect(canonicalJson([-0])).toBe('[0]');
    expect(() => canonicalJson({ peak: Number.NaN })).toThrow(/non-finite number at \$\.peak/);
    expect(() => canonicalJson([Infinity])).toThrow(/non-finite/);
  });
});

describe('scoring determinism', () => {
  const failing = applyPatch(naSwingGate(), { answers: { controlReachThrough: YES }, measurements: { hingeGapMm: len(12) } });

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
    expect(result.ruleset).toEqual({ family: 'north-american-gate', version: '2026.1', contentSha256: ruleset.contentSha256 });
    expect(result.inputSha256).toMatch(/^[0-9a-f]{64}$/);
  });
});
