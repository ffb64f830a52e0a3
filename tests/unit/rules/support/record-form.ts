/**
 * The record form results hash, written here independently of src/lib/rules/input-hash.ts: the
 * answers split into `answers` (the version's yes/no/na questions) and `choices` (the rest), as
 * the input looked when answers and choices were separate members; and an independent
 * deterministic JSON writer from npm (keys sorted, no whitespace) to write it.
 */
import { configure } from 'safe-stable-stringify';
import type { AssessmentInput, RulesetVersion } from '@/lib/rules';

export const referenceJson = configure({ deterministic: true, bigint: false, circularValue: Error });

/** The record form of `input`; with `members`, only those top-level members besides the answers. */
export function recordForm(
  input: AssessmentInput,
  version: RulesetVersion,
  members?: readonly string[],
): unknown {
  const yesNo = new Set(version.questions.filter((q) => q.answerType === 'yes_no_na').map((q) => q.key));
  const { answers, ...rest } = JSON.parse(JSON.stringify(input)) as AssessmentInput;
  let form: Record<string, unknown> = rest;
  if (members) {
    form = {};
    for (const name of members) if (name in rest) form[name] = (rest as Record<string, unknown>)[name];
  }
  if (!answers) return form;
  const split: Record<'answers' | 'choices', Record<string, unknown>> = { answers: {}, choices: {} };
  for (const [key, entry] of Object.entries(answers))
    split[yesNo.has(key) ? 'answers' : 'choices'][key] = entry;
  return { ...form, ...split };
}

/** The same object with every key order reversed, all the way down. */
export function reverseKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reverseKeys);
  if (value && typeof value === 'object')
    return Object.fromEntries(
      Object.entries(value)
        .reverse()
        .map(([k, v]) => [k, reverseKeys(v)]),
    );
  return value;
}
