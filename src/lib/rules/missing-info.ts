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

/** How one fact is explained when missing, worked out once per version. */
interface Explanation {
  /** The question asking for the fact itself, if any. */
  direct: MissingItem | null;
  /** Question facts a derived fact is computed from, with their prompts. */
  sources: ReadonlyArray<{ path: FactPath; item: MissingItem }>;
  /** The fact's own description, when none of its sources explains it. */
  fallback: MissingItem;
}

const explanations = new WeakMap<CompiledRuleset, Map<string, Explanation>>();

function explanationOf(key: string, compiled: CompiledRuleset): Explanation {
  let byKey = explanations.get(compiled);
  if (!byKey) explanations.set(compiled, (byKey = new Map()));
  let found = byKey.get(key);
  if (!found) {
    const question = compiled.questionByFact.get(key);
    const spec = FACT_CATALOGUE[key];
    const sources: Array<{ path: FactPath; item: MissingItem }> = [];
    for (const source of spec?.from ?? []) {
      const q = compiled.questionByFact.get(source);
      if (q)
        sources.push({
          path: { key: source, segments: source.split('.') },
          item: Object.freeze({ key: source, prompt: q.prompt }),
        });
    }
    found = {
      direct: question ? Object.freeze({ key, prompt: question.prompt }) : null,
      sources,
      fallback: Object.freeze({ key, prompt: spec ? capitalise(spec.label) : key }),
    };
    byKey.set(key, found);
  }
  return found;
}

/** The missing items behind one missing fact. */
export function explainMissing(path: FactPath, facts: unknown, compiled: CompiledRuleset): MissingItem[] {
  const explanation = explanationOf(path.key, compiled);
  if (explanation.direct) return [explanation.direct];
  const asked = explanation.sources
    .filter((source) => isMissing(readFact(facts, source.path)))
    .map((source) => source.item);
  return asked.length > 0 ? asked : [explanation.fallback];
}

const capitalise = (text: string): string => text.charAt(0).toUpperCase() + text.slice(1);
