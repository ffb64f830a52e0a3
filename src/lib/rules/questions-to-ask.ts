/**
 * Which questions the walk-through shows for this gate right now: those asked for its kind
 * whose `askWhen` (if any) holds on what is already known, in the version's section order.
 * The form calls it after each answer, so follow-up questions appear as they become relevant.
 */
import { compileRuleset } from './compile';
import { buildFacts } from './facts';
import type { AssessmentInput } from './input';
import { compileLogic, truthy, type CompiledLogic } from './json-logic-compile';
import type { RulesetQuestion, RulesetVersion } from './ruleset-schema';

const askWhenCache = new WeakMap<RulesetQuestion, CompiledLogic>();

export function questionsToAsk(input: AssessmentInput, version: RulesetVersion): RulesetQuestion[] {
  const compiled = compileRuleset(version);
  const { facts } = buildFacts(input);
  const asked = version.questions.filter((q) => {
    if (!q.gateKinds.includes(input.profile.kind)) return false;
    if (q.askWhen === undefined) return true;
    let when = askWhenCache.get(q);
    if (!when) {
      when = compileLogic(q.askWhen);
      askWhenCache.set(q, when);
    }
    return truthy(when(facts));
  });
  const order = new Map(version.questions.map((q, i) => [q.key, i]));
  return asked.sort(
    (a, b) =>
      (compiled.sectionRank.get(a.section) ?? 0) - (compiled.sectionRank.get(b.section) ?? 0) ||
      (order.get(a.key) ?? 0) - (order.get(b.key) ?? 0),
  );
}
