/**
 * What the walk-through page hands its island, and the pure helpers over it: which questions
 * to show for this gate right now (kind, `askWhen`), grouped by walk section in the order one
 * walks a gate, and which ones still need information.
 */
import { compileLogic, truthy, type CompiledLogic } from '@/lib/rules/json-logic-compile';
import type { AnswerType } from '@/lib/rules/ruleset-schema';
import type { WalkDraft, WalkGate, WalkQuestion, WalkRuleset } from '@/lib/api/walk-through';
import type { WalkSection } from '@/lib/rules/vocabulary';

export const isMeasured = (type: AnswerType): boolean =>
  !['yes_no_na', 'choice', 'date', 'text'].includes(type);

/** The facts `askWhen` may read that the device knows: the gate, the site, answers and measurements. */
export function visibilityFacts(gate: WalkGate, draft: WalkDraft): Record<string, unknown> {
  const answers: Record<string, string> = {};
  for (const [key, entry] of Object.entries(draft.answers)) answers[key] = entry.value;
  const m: Record<string, number> = {};
  for (const [key, entry] of Object.entries(draft.measurements)) m[key] = entry.canonical;
  return {
    profile: {
      kind: gate.kind,
      leaves: gate.leaves,
      openingDirection: gate.openingDirection,
      usageClass: gate.usageClass,
      operatorListed: gate.operator.listed,
      automaticClosing: gate.operator.automaticClosing,
      leafWidthMm: gate.widthMm,
      leafHeightMm: gate.heightMm,
      leafWeightKg: gate.weightKg,
    },
    site: draft.observations.site ?? {},
    answers,
    m,
    calc: {},
  };
}

const compiled = new Map<string, CompiledLogic>();

/** Questions asked for this gate now, in the version's section order then file order. */
export function questionsToShow(ruleset: WalkRuleset, gate: WalkGate, draft: WalkDraft): WalkQuestion[] {
  const facts = visibilityFacts(gate, draft);
  const rank = new Map(ruleset.sections.map((s, i) => [s.key, i]));
  return ruleset.questions
    .map((q, i) => ({ q, i }))
    .filter(({ q }) => {
      if (!q.gateKinds.includes(gate.kind)) return false;
      if (q.askWhen === undefined) return true;
      let when = compiled.get(q.key);
      if (!when) {
        when = compileLogic(q.askWhen);
        compiled.set(q.key, when);
      }
      try {
        return truthy(when(facts));
      } catch {
        return true;
      }
    })
    .sort((a, b) => (rank.get(a.q.section) ?? 0) - (rank.get(b.q.section) ?? 0) || a.i - b.i)
    .map(({ q }) => q);
}

export interface SectionGroup {
  key: WalkSection;
  title: string;
  questions: WalkQuestion[];
}

/** Sections in walk order with their visible questions; a section with nothing to ask still shows when it has a tool (force, geometry, sensing). */
export function groupBySection(
  ruleset: WalkRuleset,
  questions: readonly WalkQuestion[],
  alwaysShow: ReadonlySet<string> = new Set(),
): SectionGroup[] {
  return ruleset.sections
    .map((section) => ({
      key: section.key,
      title: section.title,
      questions: questions.filter((q) => q.section === section.key),
    }))
    .filter((group) => group.questions.length > 0 || alwaysShow.has(group.key));
}

export function isAnswered(question: WalkQuestion, draft: WalkDraft): boolean {
  return isMeasured(question.answerType)
    ? draft.measurements[question.key] !== undefined
    : Boolean(draft.answers[question.key]?.value);
}

/** The question a missing fact (`answers.x`, `m.x`) points at, if it is one. */
export function questionKeyOfFact(fact: string): string | null {
  const match = /^(?:answers|m)\.([a-zA-Z0-9]+)$/.exec(fact);
  return match ? (match[1] as string) : null;
}

/** Which walk-through tool answers a missing derived fact. */
export function toolOfFact(fact: string): 'site' | 'entrapment' | 'force' | 'geometry' | 'gate' | null {
  if (fact.startsWith('site.')) return 'site';
  if (fact.startsWith('calc.entrapment')) return 'entrapment';
  if (fact.startsWith('calc.force')) return 'force';
  if (fact.startsWith('calc.geometry')) return 'geometry';
  if (fact.startsWith('profile.')) return 'gate';
  return null;
}

/** One thing the result is waiting on, as the auditor reads it: items with the same words are one entry. */
export interface NeededItem {
  key: string;
  prompt: string;
  ruleIds: string[];
}

export function mergeNeeds(
  items: readonly { key: string; prompt: string; ruleIds: readonly string[] }[],
): NeededItem[] {
  const byPrompt = new Map<string, NeededItem>();
  for (const item of items) {
    const seen = byPrompt.get(item.prompt);
    if (seen) seen.ruleIds = [...new Set([...seen.ruleIds, ...item.ruleIds])];
    else byPrompt.set(item.prompt, { key: item.key, prompt: item.prompt, ruleIds: [...item.ruleIds] });
  }
  return [...byPrompt.values()];
}
