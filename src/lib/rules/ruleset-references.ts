/**
 * Cross-reference checks on a ruleset version that a shape schema cannot express: unique ids,
 * sections and areas declared, every fact a condition reads actually asked for or derived,
 * every `params.<name>` defined, only supported JSON Logic operators, and an HRN table that
 * holds every key the defaults can produce. Each issue carries the path of the field at fault.
 */
import type { DphKey, FeKey, LoKey, NpKey } from './calculators/hrn';
import { FACT_CATALOGUE } from './fact-catalogue';
import { analyseLogic } from './json-logic-analysis';
import { COMPILED_OPERATORS } from './json-logic-compile';
import { CANONICAL_UNIT_OF, kindOfUnit, MEASURED_ANSWER_TYPES, type MeasuredAnswerType } from './measures';
import type { RulesetQuestion, RulesetRule, RulesetVersion } from './ruleset-schema';

export interface RulesetIssue {
  path: Array<string | number>;
  message: string;
}

/** Operators a ruleset may use: the ones the compiler turns into closures. */
export const RULESET_OPERATORS: ReadonlySet<string> = COMPILED_OPERATORS;

/** Keys the HRN defaults (deriveHrnFactors) can produce; the table must price each one. */
const DERIVABLE_HRN_KEYS = {
  lo: [
    'almost_impossible',
    'highly_unlikely',
    'unlikely',
    'possible',
    'even_chance',
    'probable',
    'likely',
    'certain',
  ] satisfies LoKey[],
  fe: ['annually', 'monthly', 'weekly', 'daily', 'hourly', 'constantly'] satisfies FeKey[],
  np: ['1_2', '3_7', '8_15'] satisfies NpKey[],
  dph: [] as DphKey[],
};

/** Suffix a measured question's key ends with, so `m.hingeGapMm` says its unit. */
export const KEY_SUFFIX_OF: Readonly<Record<MeasuredAnswerType, string>> = Object.freeze({
  length: 'Mm',
  force: 'N',
  mass: 'Kg',
  speed: 'Mps',
  time: 'S',
  voltage: 'V',
  current: 'A',
  angle: 'Deg',
  count: '',
});

const isMeasured = (q: RulesetQuestion): boolean =>
  (MEASURED_ANSWER_TYPES as readonly string[]).includes(q.answerType);

/** The fact path a question's answer is read from. */
export function factKeyOfQuestion(q: Pick<RulesetQuestion, 'key' | 'answerType'>): string {
  return (MEASURED_ANSWER_TYPES as readonly string[]).includes(q.answerType)
    ? `m.${q.key}`
    : `answers.${q.key}`;
}

function duplicates<T>(
  items: readonly T[],
  keyOf: (item: T) => string,
  path: string,
  issues: RulesetIssue[],
): void {
  const seen = new Set<string>();
  items.forEach((item, i) => {
    const k = keyOf(item);
    if (seen.has(k)) issues.push({ path: [path, i], message: `"${k}" appears more than once in ${path}` });
    seen.add(k);
  });
}

/** All cross-reference problems of a version; empty when it is sound. */
export function checkRulesetReferences(ruleset: RulesetVersion): RulesetIssue[] {
  const issues: RulesetIssue[] = [];
  duplicates(ruleset.sources, (s) => s.id, 'sources', issues);
  duplicates(ruleset.sections, (s) => s.key, 'sections', issues);
  duplicates(ruleset.areas, (a) => a.key, 'areas', issues);
  duplicates(ruleset.questions, (q) => q.key, 'questions', issues);
  duplicates(ruleset.rules, (r) => r.id, 'rules', issues);

  const sections = new Set(ruleset.sections.map((s) => s.key));
  const areas = new Set(ruleset.areas.map((a) => a.key));
  const sources = new Set(ruleset.sources.map((s) => s.id));
  const questionByFact = new Map(ruleset.questions.map((q) => [factKeyOfQuestion(q), q]));

  const knownFact = (fact: string): boolean =>
    questionByFact.has(fact) || Object.prototype.hasOwnProperty.call(FACT_CATALOGUE, fact);

  ruleset.questions.forEach((q, i) => {
    if (!sections.has(q.section))
      issues.push({
        path: ['questions', i, 'section'],
        message: `section "${q.section}" is not declared in sections`,
      });
    if (!areas.has(q.area))
      issues.push({ path: ['questions', i, 'area'], message: `area "${q.area}" is not declared in areas` });
    if (isMeasured(q)) {
      const suffix = KEY_SUFFIX_OF[q.answerType as MeasuredAnswerType];
      if (suffix && !q.key.endsWith(suffix)) {
        issues.push({
          path: ['questions', i, 'key'],
          message: `a ${q.answerType} in ${CANONICAL_UNIT_OF[q.answerType as MeasuredAnswerType]} needs a key ending in "${suffix}"`,
        });
      }
    }
    if (q.askWhen !== undefined)
      checkLogic(q.askWhen, ['questions', i, 'askWhen'], new Set(), knownFact, issues);
    q.entryUnits?.forEach((unit, j) => {
      if (!isMeasured(q) || kindOfUnit(unit) !== q.answerType)
        issues.push({
          path: ['questions', i, 'entryUnits', j],
          message: `"${unit}" is not a unit of a ${q.answerType} answer`,
        });
    });
  });

  const ruleById = new Map(ruleset.rules.map((rule) => [rule.id, rule]));
  // Implied zones read what the auditor entered (never a derived fact: the entrapment facts are built from them).
  const enteredFact = (fact: string): boolean => knownFact(fact) && !fact.startsWith('calc.');
  ruleset.impliedZones?.forEach((zone, i) => {
    const rule = ruleById.get(zone.rule);
    if (!rule)
      issues.push({
        path: ['impliedZones', i, 'rule'],
        message: `"${zone.rule}" is not a rule of this version`,
      });
    checkLogic(
      zone.when,
      ['impliedZones', i, 'when'],
      new Set(Object.keys(rule?.params ?? {})),
      enteredFact,
      issues,
    );
  });
  duplicates(ruleset.crossChecks ?? [], (c) => c.id, 'crossChecks', issues);
  ruleset.crossChecks?.forEach((check, i) => {
    check.facts.forEach((fact, j) => {
      if (!knownFact(fact) || fact.startsWith('calc.'))
        issues.push({
          path: ['crossChecks', i, 'facts', j],
          message: `"${fact}" is not an answer or measurement of this version`,
        });
    });
    checkLogic(check.when, ['crossChecks', i, 'when'], new Set(), knownFact, issues);
  });

  ruleset.rules.forEach((rule, i) =>
    checkRule(
      rule,
      i,
      { areas, sources, questionByFact, knownFact, harm: new Set(ruleset.hrn.dph.map((d) => d.key)) },
      issues,
    ),
  );
  checkHrn(ruleset, issues);
  return issues;
}

interface RuleContext {
  areas: Set<string>;
  sources: Set<string>;
  harm: Set<string>;
  questionByFact: Map<string, RulesetQuestion>;
  knownFact: (fact: string) => boolean;
}

function checkRule(rule: RulesetRule, i: number, ctx: RuleContext, issues: RulesetIssue[]): void {
  const at = (...path: Array<string | number>) => ['rules', i, ...path];
  if (!ctx.areas.has(rule.area))
    issues.push({ path: at('area'), message: `area "${rule.area}" is not declared in areas` });
  if (rule.reference.source && !ctx.sources.has(rule.reference.source))
    issues.push({
      path: at('reference', 'source'),
      message: `source "${rule.reference.source}" is not declared in sources`,
    });
  if (!ctx.harm.has(rule.harm))
    issues.push({ path: at('harm'), message: `harm "${rule.harm}" is not a DPH key of the HRN table` });

  const params = new Set(Object.keys(rule.params));
  const declared = new Set([...rule.requires, ...(rule.optional ?? [])]);
  rule.requires.forEach((fact, j) => {
    if (!ctx.knownFact(fact))
      issues.push({
        path: at('requires', j),
        message: `"${fact}" is neither a question of this version nor a known fact`,
      });
  });
  (rule.optional ?? []).forEach((fact, j) => {
    if (!ctx.knownFact(fact))
      issues.push({
        path: at('optional', j),
        message: `"${fact}" is neither a question of this version nor a known fact`,
      });
    if (rule.requires.includes(fact))
      issues.push({ path: at('optional', j), message: `"${fact}" is both required and optional` });
  });

  const conditionVars = checkLogic(rule.condition, at('condition'), params, ctx.knownFact, issues);
  for (const fact of conditionVars) {
    const spec = FACT_CATALOGUE[fact];
    if (!declared.has(fact) && !spec?.always) {
      issues.push({
        path: at('condition'),
        message: `the condition reads "${fact}" but it is in neither requires nor optional (a missing value would read as null)`,
      });
    }
  }
  if (rule.appliesWhen !== undefined)
    checkLogic(rule.appliesWhen, at('appliesWhen'), params, ctx.knownFact, issues);

  for (const fact of [...declared]) {
    const question = ctx.questionByFact.get(fact);
    if (question) {
      const uncovered = rule.appliesTo.gateKinds.filter((kind) => !question.gateKinds.includes(kind));
      if (uncovered.length > 0) {
        issues.push({
          path: at('appliesTo', 'gateKinds'),
          message: `rule reads "${fact}" but question "${question.key}" is not asked for ${uncovered.join(', ')} gates`,
        });
      }
    }
    for (const source of FACT_CATALOGUE[fact]?.from ?? []) {
      if (!ctx.questionByFact.has(source))
        issues.push({
          path: at('requires'),
          message: `"${fact}" is worked out from "${source}", which this version never asks`,
        });
    }
  }
}

/** Checks operators and vars of one expression; returns the fact vars it reads. */
function checkLogic(
  logic: unknown,
  path: Array<string | number>,
  params: Set<string>,
  knownFact: (fact: string) => boolean,
  issues: RulesetIssue[],
): string[] {
  const usage = analyseLogic(logic);
  for (const op of usage.operators) {
    if (!RULESET_OPERATORS.has(op))
      issues.push({ path, message: `operator "${op}" is not supported in rulesets` });
  }
  for (const where of usage.computedVarAt)
    issues.push({ path, message: `a var path must be written out, not computed (at ${where || 'the top'})` });
  const facts: string[] = [];
  for (const name of [...usage.vars, ...usage.missingKeys]) {
    if (name.startsWith('params.')) {
      const param = name.slice('params.'.length);
      if (!params.has(param))
        issues.push({ path, message: `"${name}" is not defined in this rule's params` });
    } else if (!knownFact(name)) {
      issues.push({ path, message: `"${name}" is neither a question of this version nor a known fact` });
    } else {
      facts.push(name);
    }
  }
  return facts;
}

function checkHrn(ruleset: RulesetVersion, issues: RulesetIssue[]): void {
  const { hrn } = ruleset;
  for (const part of ['lo', 'fe', 'dph'] as const) {
    duplicates(hrn[part], (level) => level.key, `hrn.${part}`, issues);
    const keys = new Set(hrn[part].map((level) => level.key));
    for (const needed of DERIVABLE_HRN_KEYS[part]) {
      if (!keys.has(needed))
        issues.push({
          path: ['hrn', part],
          message: `the HRN table must price "${needed}", which the derived factors can produce`,
        });
    }
  }
  const npKeys = new Set(hrn.np.map((row) => row.key));
  for (const needed of DERIVABLE_HRN_KEYS.np)
    if (!npKeys.has(needed))
      issues.push({ path: ['hrn', 'np'], message: `the HRN table must price "${needed}"` });
  for (const [name, rows] of [
    ['np', hrn.np],
    ['bands', hrn.bands],
  ] as const) {
    rows.forEach((row, i) => {
      const last = i === rows.length - 1;
      if (last !== (row.upTo === null))
        issues.push({
          path: ['hrn', name, i, 'upTo'],
          message: 'only the last row has no upper bound (null)',
        });
      const previous = rows[i - 1]?.upTo;
      if (i > 0 && row.upTo !== null && previous !== null && previous !== undefined && row.upTo <= previous) {
        issues.push({ path: ['hrn', name, i, 'upTo'], message: 'upper bounds must rise row by row' });
      }
    });
  }
}
