/**
 * Scores a gate: `score(input, rulesetVersion)` builds the facts, runs every enabled rule's
 * compiled condition, rates failing findings (HRN), scores each hazard area and gives the verdict.
 *
 * Deterministic by construction: no clock, no randomness, findings in a fixed order (severity,
 * then the version's area order, then rule id; fixed when the version is compiled) and every
 * collection built in a stable order, so the same input and version give byte-identical
 * canonical JSON and the same SHA-256.
 */
import { z } from 'zod';
import { areaScores } from './area-scores';
import { compileRuleset, readFact, type CompiledRule, type CompiledRuleset, type FactPath } from './compile';
import { buildFacts, type Facts } from './facts';
import { rateFinding } from './finding-hrn';
import { AssessmentInputSchema, type AssessmentInput } from './input';
import { AssessmentInputError, checkInputAgainstRuleset, issuesFromZod } from './input-check';
import { inputEntries } from './input-entries';
import { inputSha256 } from './input-hash';
import { truthy } from './json-logic-compile';
import { explainMissing, isMissing } from './missing-info';
import type {
  Contradiction,
  Finding,
  MissingItem,
  NeedsInfoItem,
  Reinspection,
  ScoreResult,
} from './result-types';
import { factKeyOfQuestion } from './ruleset-references';
import type { RulesetVersion } from './ruleset-schema';
import { verdictOf } from './verdict';
import type { Outcome } from './vocabulary';

/** A validated version with its content hash, as loadRulesetFile returns it. */
export interface LoadedRuleset {
  version: RulesetVersion;
  contentSha256: string;
}

/**
 * The input schema with zod's ahead-of-time compiled fast path: a valid input is checked and
 * copied in one generated function; an invalid one falls back to the ordinary parser, so the
 * errors (and their field paths) are the same.
 */
const parseInput = z.compile(AssessmentInputSchema);

function resolve(ruleset: LoadedRuleset | RulesetVersion): CompiledRuleset {
  return 'contentSha256' in ruleset && 'version' in ruleset && typeof ruleset.version === 'object'
    ? compileRuleset(ruleset.version, ruleset.contentSha256)
    : compileRuleset(ruleset as RulesetVersion);
}

/**
 * Parses the input (throwing AssessmentInputError with field paths when it is not valid) and
 * scores it against the version.
 */
export function score(input: unknown, ruleset: LoadedRuleset | RulesetVersion): ScoreResult {
  const parsed = parseInput.safeParse(input);
  if (!parsed.success) throw new AssessmentInputError(issuesFromZod(parsed.error));
  return scoreChecked(parsed.data, ruleset);
}

/**
 * Scores an input that is already valid: parsed on the way in (an API body) or assembled from
 * stored documents that were checked when saved (assembleInput). It is still checked against
 * the version (AssessmentInputError): an answer the version asks in another form is refused.
 */
export function scoreParsed(input: AssessmentInput, ruleset: LoadedRuleset | RulesetVersion): ScoreResult {
  return scoreChecked(input, ruleset);
}

function scoreChecked(input: AssessmentInput, ruleset: LoadedRuleset | RulesetVersion): ScoreResult {
  const compiled = resolve(ruleset);
  // Answers and measurements are read once, for the check, the facts and the input hash.
  const entries = inputEntries(input);
  const issues = checkInputAgainstRuleset(input, compiled, entries);
  if (issues.length > 0) throw new AssessmentInputError(issues);
  const { facts, problems } = buildFacts(input, compiled, entries);
  const contradictions = compiled.crossChecks.length > 0 ? crossCheck(facts, compiled) : null;
  // compiled.rules is already in report order (severity, area, id).
  const rules = compiled.rules;
  const skipped = notApplicableAt(compiled, input);
  const findings = new Array<Finding>(rules.length);
  // Indexed loops over rules and findings: for…of here called the array iterator and allocated per element.
  for (let i = 0; i < rules.length; i++)
    findings[i] = skipped[i] ?? evaluateRule(rules[i]!, facts, input, compiled, contradictions);
  const counts = {
    pass: 0,
    fail: 0,
    na: 0,
    needsInfo: 0,
    failedBySeverity: { critical: 0, major: 0, minor: 0 },
  };
  for (let i = 0; i < findings.length; i++) {
    const f = findings[i]!;
    if (f.outcome === 'pass') counts.pass += 1;
    else if (f.outcome === 'fail') {
      counts.fail += 1;
      counts.failedBySeverity[f.severity] += 1;
    } else if (f.outcome === 'n/a') counts.na += 1;
    else counts.needsInfo += 1;
  }
  const { version } = compiled;
  const verdict = verdictOf(findings);
  const result: ScoreResult = {
    ruleset: { family: version.family, version: version.version, contentSha256: compiled.contentSha256 },
    inputSha256: inputSha256(input, compiled, entries),
    verdict,
    complete: counts.needsInfo === 0 && (contradictions === null || contradictions.length === 0),
    findings,
    areaScores: areaScores(findings, version, compiled),
    counts,
    needsInfo: collectNeedsInfo(findings, compiled),
    evidenceProblems: problems,
  };
  // Versions that declare them (older results keep their shape, and so their hashes).
  if (contradictions !== null) result.contradictions = contradictions;
  if (version.reinspection)
    result.reinspection = reinspectionOf(version.reinspection, verdict, input.profile.usageClass);
  return result;
}

/** When the gate is seen again: by the verdict and the gate's usage class, from the version's data. */
function reinspectionOf(
  plan: NonNullable<CompiledRuleset['version']['reinspection']>,
  verdict: ScoreResult['verdict'],
  usageClass: 1 | 2 | 3 | 4,
): Reinspection {
  if (verdict === 'withdraw') return { when: 'fixes_reported' };
  const days = verdict === 'remedy' ? plan.remedyAfterDays : plan.clearAfterDays;
  return { when: 'after_days', afterDays: days[String(usageClass) as '1' | '2' | '3' | '4'] };
}

/**
 * Runs the version's cross-checks. A contradicted fact is not accepted: it is taken out of the
 * facts (the answers and measurements dictionaries are this scoring's own), so every rule
 * reading it needs information, and the contradiction is listed for the auditor to resolve.
 */
function crossCheck(facts: Facts, compiled: CompiledRuleset): Contradiction[] {
  const found: Contradiction[] = [];
  const checks = compiled.crossChecks;
  // All conditions see the record as entered: judge first, then take the contradicted facts out.
  const hits = checks.map((c) => truthy(c.when(facts)));
  for (let i = 0; i < checks.length; i++) {
    if (!hits[i]) continue;
    const { check, facts: paths } = checks[i]!;
    for (const path of paths) {
      const [group, name] = path.segments as [string, string];
      const holder = (facts as unknown as Record<string, Record<string, unknown> | undefined>)[group];
      if (holder && name in holder) delete holder[name];
    }
    found.push({ id: check.id, message: check.message, facts: [...check.facts] });
  }
  return found;
}

/** Shared empties for findings that looked at nothing or miss nothing (results are read-only data). */
const NOTHING_OBSERVED: Record<string, unknown> = Object.freeze({}) as Record<string, unknown>;
const NOTHING_MISSING: MissingItem[] = Object.freeze([]) as unknown as MissingItem[];

function makeFinding(
  compiledRule: CompiledRule,
  outcome: Outcome,
  missing: MissingItem[],
  observed: Record<string, unknown>,
  input: AssessmentInput,
  compiled: CompiledRuleset,
): Finding {
  const { rule } = compiledRule;
  const result: Finding = {
    ruleId: rule.id,
    title: rule.title,
    area: rule.area,
    severity: rule.severity,
    outcome,
    missing,
    observed,
    params: compiledRule.findingParams as Finding['params'],
    remediation: rule.remediation,
    caution: rule.caution,
    reference: rule.reference,
  };
  if (rule.local) result.local = true;
  if (outcome === 'fail')
    result.hrn = rateFinding(
      input,
      rule.harm,
      rule.id,
      compiled.version.hrn,
      compiledRule.ratings,
      rule.severity,
    );
  return result;
}

/**
 * A rule that does not apply to the gate's kind or usage class gives the same finding at every
 * such gate: built once per compiled rule and shared, frozen (results are read-only data).
 */
const notApplicableFindings = new WeakMap<CompiledRule, Finding>();

function notApplicable(
  compiledRule: CompiledRule,
  input: AssessmentInput,
  compiled: CompiledRuleset,
): Finding {
  let finding = notApplicableFindings.get(compiledRule);
  if (!finding)
    notApplicableFindings.set(
      compiledRule,
      (finding = Object.freeze(
        makeFinding(compiledRule, 'n/a', NOTHING_MISSING, NOTHING_OBSERVED, input, compiled),
      )),
    );
  return finding;
}

/**
 * Per version and (gate kind, usage class), in the version's rule order: the shared finding of each
 * rule that does not apply there, null for each rule that does. Worked out on first use.
 */
const notApplicableByGate = new WeakMap<CompiledRuleset, Map<string, ReadonlyArray<Finding | null>>>();

function notApplicableAt(compiled: CompiledRuleset, input: AssessmentInput): ReadonlyArray<Finding | null> {
  const { kind, usageClass } = input.profile;
  let byGate = notApplicableByGate.get(compiled);
  if (!byGate) notApplicableByGate.set(compiled, (byGate = new Map()));
  const gate = `${kind} ${usageClass}`;
  let skipped = byGate.get(gate);
  if (!skipped) {
    skipped = compiled.rules.map((rule) =>
      rule.gateKinds.has(kind) && rule.usageClasses.has(usageClass)
        ? null
        : notApplicable(rule, input, compiled),
    );
    byGate.set(gate, skipped);
  }
  return skipped;
}

/** The facts the rule being evaluated looks at, in `observed` order (see evaluateRule). */
const factValues: unknown[] = [];

function evaluateRule(
  compiledRule: CompiledRule,
  facts: Facts,
  input: AssessmentInput,
  compiled: CompiledRuleset,
  contradictions: Contradiction[] | null,
): Finding {
  // The caller has already left out rules that do not apply to the gate's kind or usage class.
  // Each fact the rule looks at is read once: observed values, applicability and requirements share the reads.
  const paths = compiledRule.observed;
  // Scratch space reused by every rule (evaluateRule never re-enters itself): no array per rule.
  const values = factValues;
  const observed: Record<string, unknown> = {};
  for (let i = 0; i < paths.length; i++) {
    const path = paths[i]!;
    const value = readFact(facts, path);
    values[i] = value;
    if (!isMissing(value)) observed[path.key] = value;
  }
  if (compiledRule.appliesWhen) {
    let unknown: FactPath[] | null = null;
    const at = compiledRule.appliesWhenRequiresAt;
    for (let i = 0; i < at.length; i++)
      if (isMissing(values[at[i]!])) (unknown ??= []).push(compiledRule.appliesWhenRequires[i]!);
    if (unknown) {
      return makeFinding(
        compiledRule,
        'needs_info',
        dedupe(unknown.flatMap((path) => explainMissing(path, facts, compiled))),
        observed,
        input,
        compiled,
      );
    }
    if (!truthy(compiledRule.appliesWhen(facts)))
      return makeFinding(compiledRule, 'n/a', NOTHING_MISSING, observed, input, compiled);
  }
  let missing: MissingItem[] | null = null;
  const at = compiledRule.requiresAt;
  for (let i = 0; i < at.length; i++) {
    const value = values[at[i]!];
    // The auditor judged the question not to apply at this gate: so does the rule.
    if (value === 'na' && compiledRule.requires[i]!.segments[0] === 'answers')
      return makeFinding(compiledRule, 'n/a', NOTHING_MISSING, observed, input, compiled);
    if (isMissing(value))
      (missing ??= []).push(...explainMissing(compiledRule.requires[i]!, facts, compiled));
  }
  if (missing) {
    if (contradictions && contradictions.length > 0)
      missing = missing.map((item) => asContradiction(item, contradictions));
    return makeFinding(compiledRule, 'needs_info', dedupe(missing), observed, input, compiled);
  }
  return makeFinding(
    compiledRule,
    truthy(compiledRule.condition(facts)) ? 'pass' : 'fail',
    NOTHING_MISSING,
    observed,
    input,
    compiled,
  );
}

/** A missing item whose fact was given but contradicted: the prompt says what to resolve. */
function asContradiction(item: MissingItem, contradictions: readonly Contradiction[]): MissingItem {
  for (const c of contradictions)
    if (c.facts.includes(item.key)) return { key: item.key, prompt: `Resolve: ${c.message}` };
  return item;
}

/** The items with each key once, first kept (a finding misses a handful at most: a scan, no Set). */
function dedupe(items: MissingItem[]): MissingItem[] {
  const kept: MissingItem[] = [];
  for (let i = 0; i < items.length; i++) {
    const item = items[i]!;
    let seen = false;
    for (let j = 0; j < kept.length && !seen; j++) seen = kept[j]!.key === item.key;
    if (!seen) kept.push(item);
  }
  return kept;
}

/** Where a needed item sorts: questions in walk order first, then derived facts by key. */
const needRanks = new WeakMap<CompiledRuleset, Map<string, number>>();

function needRanksOf(compiled: CompiledRuleset): Map<string, number> {
  let ranks = needRanks.get(compiled);
  if (!ranks) {
    const order = compiled.version.questions.map((q, i) => ({
      fact: factKeyOfQuestion(q),
      section: compiled.sectionRank.get(q.section) ?? 0,
      i,
    }));
    order.sort((a, b) => a.section - b.section || a.i - b.i);
    ranks = new Map(order.map((o, rank) => [o.fact, rank]));
    needRanks.set(compiled, ranks);
  }
  return ranks;
}

function collectNeedsInfo(findings: readonly Finding[], compiled: CompiledRuleset): NeedsInfoItem[] {
  let byKey: Map<string, NeedsInfoItem> | null = null;
  for (let i = 0; i < findings.length; i++) {
    const f = findings[i]!;
    if (f.missing.length === 0) continue;
    for (const item of f.missing) {
      byKey ??= new Map();
      let entry = byKey.get(item.key);
      if (!entry) byKey.set(item.key, (entry = { key: item.key, prompt: item.prompt, ruleIds: [] }));
      entry.ruleIds.push(f.ruleId);
    }
  }
  if (!byKey) return [];
  const ranks = needRanksOf(compiled);
  const ranked = [...byKey.values()].map((item) => ({
    item,
    rank: ranks.get(item.key) ?? Number.MAX_SAFE_INTEGER,
  }));
  ranked.sort((a, b) => a.rank - b.rank || (a.item.key < b.item.key ? -1 : a.item.key > b.item.key ? 1 : 0));
  return ranked.map(({ item }) => {
    item.ruleIds.sort();
    return item;
  });
}
