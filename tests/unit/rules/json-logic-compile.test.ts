import { describe, expect, it } from 'vitest';
import jsonLogic from 'json-logic-js';
import { compileLogic } from '@/lib/rules/json-logic-compile';
import { createPrng, type Prng } from './support/prng';

// The reference is json-logic-js 2 (`jsonLogic.apply`); the compiled closure must agree with it
// on every expression and data value, including JavaScript's loose comparisons and thrown errors.

const OPS = [
  '==',
  '===',
  '!=',
  '!==',
  '<',
  '<=',
  '>',
  '>=',
  'and',
  'or',
  '!',
  '!!',
  'if',
  'in',
  '+',
  '-',
  '*',
  '/',
  '%',
  'min',
  'max',
  'cat',
  'merge',
  'missing',
  'missing_some',
  'all',
  'some',
  'none',
  'substr',
  'map',
];
const PATHS = [
  'a',
  'b',
  'n.x',
  'n.y',
  'n.deep.z',
  'list',
  'str',
  'nothing',
  'n.nothing',
  '',
  'params.limit',
  'flag',
];

function literal(rng: Prng): unknown {
  return rng.pick([
    0,
    1,
    -1,
    2.5,
    102,
    406,
    '',
    'yes',
    'no',
    'na',
    '3',
    null,
    true,
    false,
    [],
    [1, 2],
    ['yes', 'na'],
  ]);
}

function expression(rng: Prng, depth: number): unknown {
  if (depth <= 0 || rng.chance(0.3)) {
    if (rng.chance(0.5)) {
      const path = rng.pick(PATHS);
      return rng.chance(0.2) ? { var: [path, literal(rng)] } : { var: path };
    }
    return literal(rng);
  }
  const op = rng.pick(OPS);
  if (op === 'all' || op === 'some' || op === 'none' || op === 'map') {
    return { [op]: [{ var: 'list' }, { '>': [{ var: '' }, rng.int(0, 3)] }] };
  }
  if (op === 'missing' || op === 'missing_some') {
    return op === 'missing'
      ? { missing: [rng.pick(PATHS), rng.pick(PATHS)] }
      : { missing_some: [1, [rng.pick(PATHS), rng.pick(PATHS)]] };
  }
  const arity = op === '!' || op === '!!' ? 1 : rng.int(op === 'if' ? 1 : 0, 4);
  const args = Array.from({ length: arity }, () => expression(rng, depth - 1));
  return rng.chance(0.1) && args.length === 1 ? { [op]: args[0] } : { [op]: args };
}

function dataFor(rng: Prng): Record<string, unknown> {
  return {
    a: literal(rng),
    b: literal(rng),
    n: rng.chance(0.8)
      ? { x: literal(rng), y: rng.int(-5, 500), deep: rng.chance(0.5) ? { z: literal(rng) } : null }
      : null,
    list: rng.chance(0.7) ? [rng.int(0, 4), rng.int(0, 4)] : [],
    str: rng.pick(['yes', 'abc', '', '12']),
    params: { limit: 102 },
    flag: rng.chance(0.5),
  };
}

function outcome(run: () => unknown): { value?: unknown; error?: boolean } {
  try {
    return { value: run() };
  } catch {
    return { error: true };
  }
}

describe('compileLogic', () => {
  it('agrees with json-logic-js apply on 20,000 generated expressions and data', () => {
    const rng = createPrng(20260101);
    const mismatches: string[] = [];
    const same = (a: { value?: unknown; error?: boolean }, b: { value?: unknown; error?: boolean }) =>
      a.error === b.error &&
      typeof a.value === typeof b.value &&
      (Object.is(a.value, b.value) || JSON.stringify(a.value) === JSON.stringify(b.value));
    for (let i = 0; i < 20_000; i++) {
      const logic = expression(rng, 4);
      const data = dataFor(rng);
      const compiled = compileLogic(logic);
      const expected = outcome(() => jsonLogic.apply(logic as never, data));
      const actual = outcome(() => compiled(data));
      if (!same(actual, expected)) mismatches.push(JSON.stringify({ logic, data, actual, expected }));
    }
    expect(mismatches.slice(0, 5)).toEqual([]);
  }, 60_000);

  it('turns params vars into constants without changing the answer', () => {
    const logic = { '<=': [{ var: 'm.gap' }, { var: 'params.maxGapMm' }] };
    const compiled = compileLogic(logic, { constants: { prefix: 'params', values: { maxGapMm: 102 } } });
    // The fact object carries no params at all; the constant comes from compile time.
    expect(compiled({ m: { gap: 100 } })).toBe(true);
    expect(compiled({ m: { gap: 103 } })).toBe(false);
    expect(jsonLogic.apply(logic as never, { m: { gap: 103 }, params: { maxGapMm: 102 } })).toBe(false);
  });

  it('reads the array element, not params, inside an all body', () => {
    const logic = { all: [{ var: 'tests' }, { '<': [{ var: 'params.x' }, 5] }] };
    const compiled = compileLogic(logic, { constants: { prefix: 'params', values: { x: 100 } } });
    const data = { tests: [{ params: { x: 1 } }], params: { x: 100 } };
    expect(compiled(data)).toBe(jsonLogic.apply(logic as never, data));
    expect(compiled(data)).toBe(true);
  });

  it('delegates operators it does not compile to the reference library', () => {
    const logic = { substr: [{ var: 'word' }, 1, 2] };
    expect(compileLogic(logic)({ word: 'latch' })).toBe('at');
  });
});
