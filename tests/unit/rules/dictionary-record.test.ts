import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { dictionaryRecord } from '@/lib/rules/dictionary-record';
import { AnswerSchema, MeasuredValueSchema } from '@/lib/rules';
import { KEY_PATTERN } from '@/lib/rules/vocabulary';

// zod's own z.record is the reference: the dictionary record must accept, build and refuse the
// same inputs with the same issues (paths and messages), differing only in the prototype.
const key = z
  .string()
  .regex(KEY_PATTERN, 'keys are camelCase letters and digits, starting with a lower-case letter');
const pairs = [
  { name: 'answers', ordinary: z.record(key, AnswerSchema), dictionary: dictionaryRecord(key, AnswerSchema) },
  {
    name: 'measurements',
    ordinary: z.record(key, MeasuredValueSchema),
    dictionary: dictionaryRecord(key, MeasuredValueSchema),
  },
];

const issuesOf = (result: { success: boolean; error?: z.ZodError }) =>
  result.success
    ? []
    : result.error!.issues.map((issue) => ({ path: issue.path.map(String), message: issue.message }));

const anyKey = fc.oneof(
  fc.constantFrom('hingeGapMm', 'signsBothSides', 'x', '1abc', 'toString', 'constructor', '__proto__', 'aB9'),
  fc.string({ maxLength: 6 }),
);
const anyAnswer = fc.oneof(
  fc.record({ value: fc.constantFrom('yes', 'no', 'na', 'maybe') }),
  fc.record({ value: fc.constantFrom('yes', 'no'), note: fc.string({ maxLength: 8 }) }),
  fc.record({
    value: fc.double(),
    unit: fc.constantFrom('mm', 'in', 'N', 'furlong'),
    canonical: fc.double(),
  }),
  fc.constant(null),
  fc.constant('yes'),
);
const anyRecord = fc.oneof(
  fc.dictionary(anyKey, anyAnswer, { maxKeys: 6 }),
  fc.constant(null),
  fc.constant([]),
  fc.constant('answers'),
);

describe('dictionaryRecord', () => {
  it('accepts, builds and refuses exactly what z.record does, for arbitrary inputs', () => {
    for (const { ordinary, dictionary } of pairs) {
      fc.assert(
        fc.property(anyRecord, (input) => {
          const expected = ordinary.safeParse(input);
          const actual = dictionary.safeParse(input);
          expect(actual.success).toBe(expected.success);
          if (expected.success) expect({ ...(actual.data as object) }).toEqual(expected.data);
          else expect(issuesOf(actual)).toEqual(issuesOf(expected));
        }),
        { numRuns: 400, seed: 20_261_202 },
      );
    }
  });

  it('hands back a null-prototype dictionary with its keys in sorted order, so an inherited name reads nothing', () => {
    const parsed = pairs[0]!.dictionary.parse({
      zebra: { value: 'no' },
      apple: { value: 'yes', note: '  trimmed  ' },
    }) as Record<string, unknown>;
    expect(Object.getPrototypeOf(parsed)).toBeNull();
    expect(Object.keys(parsed)).toEqual(['apple', 'zebra']);
    expect(parsed.apple).toEqual({ value: 'yes', note: 'trimmed' });
    expect(parsed.toString).toBeUndefined();
  });

  it('names the field at fault inside the record, as z.record does', () => {
    const result = pairs[1]!.dictionary.safeParse({ hingeGapMm: { value: 1, unit: 'mm', canonical: 2 } });
    expect(issuesOf(result)).toEqual([
      { path: ['hingeGapMm', 'canonical'], message: '1 mm is 1 in canonical units, not 2' },
    ]);
  });
});
