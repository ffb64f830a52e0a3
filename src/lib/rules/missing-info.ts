/**
 * Says what is missing in words an auditor can act on. A missing question fact gives that
 * question's prompt; a missing derived fact gives the questions it is worked out from (those
 * still unanswered), or its own description when its inputs are structured (entrapment
 * devices, force tests, operator geometry).
 */
import type { CompiledRuleset, FactPath } from './compile';
import { readFact } from './compile';
import { FACT_CATALOGUE } from './fact-catalogue';
import type { MissingItem } from './result-types';

/** A value counts as missing when absent, null or empty text (as JSON Logic's `missing`). */
export const isMissing = (value: unknown): boolean => value === undefined || value === null || value === '';

/** The missing items behind one missing fact. */
export function explainMissing(path: FactPath, facts: unknown, compiled: CompiledRuleset): MissingItem[] {
  const question = compiled.questionByFact.get(path.key);
  if (question) return [{ key: path.key, prompt: question.prompt }];
  const spec = FACT_CATALOGUE[path.key];
  const sources = (spec?.from ?? []).filter((source) => isMissing(readFact(facts, { key: source, segments: source.split('.') })));
  const asked: MissingItem[] = [];
  for (const source of sources) {
    const q = compiled.questionByFact.get(source);
    if (q) asked.push({ key: source, prompt: q.prompt });
  }
  if (asked.length > 0) return asked;
  return [{ key: path.key, prompt: spec ? capitalise(spec.label) : path.key }];
}

const capitalise = (text: string): string => text.charAt(0).toUpperCase() + text.slice(1);
