import { describe, expect, it } from 'vitest';
import { applyMergePatch } from '@/lib/merge-patch';

describe('applyMergePatch (RFC 7396)', () => {
  // RFC 7396, Appendix A: the specification's own examples.
  const cases: [unknown, unknown, unknown][] = [
    [{ a: 'b' }, { a: 'c' }, { a: 'c' }],
    [{ a: 'b' }, { b: 'c' }, { a: 'b', b: 'c' }],
    [{ a: 'b' }, { a: null }, {}],
    [{ a: 'b', b: 'c' }, { a: null }, { b: 'c' }],
    [{ a: ['b'] }, { a: 'c' }, { a: 'c' }],
    [{ a: 'c' }, { a: ['b'] }, { a: ['b'] }],
    [{ a: { b: 'c' } }, { a: { b: 'd', c: null } }, { a: { b: 'd' } }],
    [{ a: [{ b: 'c' }] }, { a: [1] }, { a: [1] }],
    [
      ['a', 'b'],
      ['c', 'd'],
      ['c', 'd'],
    ],
    [{ a: 'b' }, ['c'], ['c']],
    [{ a: 'foo' }, null, null],
    [{ a: 'foo' }, 'bar', 'bar'],
    [{ e: null }, { a: 1 }, { e: null, a: 1 }],
    [[1, 2], { a: 'b', c: null }, { a: 'b' }],
    [{}, { a: { bb: { ccc: null } } }, { a: { bb: {} } }],
  ];
  it.each(cases)('merges %j with %j into %j', (target, patch, expected) => {
    expect(applyMergePatch(target, patch)).toEqual(expected);
  });

  it('leaves its arguments unchanged', () => {
    const target = { answers: { gateLatched: { value: 'yes' } } };
    const patch = { answers: { gateLatched: null, signsPresent: { value: 'no' } } };
    const before = JSON.stringify([target, patch]);
    applyMergePatch(target, patch);
    expect(JSON.stringify([target, patch])).toBe(before);
  });
});

describe('applyMergePatch on hostile keys', () => {
  it('never gives the result (or any object) a prototype from the patch', () => {
    const patch = JSON.parse('{"__proto__": {"isAdmin": true}}') as unknown;
    const result = applyMergePatch({ a: 1 }, patch) as Record<string, unknown>;
    expect(Object.getPrototypeOf(result)).toBe(Object.prototype);
    expect(result.isAdmin).toBeUndefined();
    expect(({} as Record<string, unknown>).isAdmin).toBeUndefined();
  });
});
