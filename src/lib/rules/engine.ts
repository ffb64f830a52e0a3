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
import { contentSha256, sha256Hex } from './hash';
import { AssessmentInputSchema, type AssessmentInput } from './input';
import { AssessmentInputError, checkInputAgainstRuleset, issuesFromZod } from './input-check';
import { truthy } from './json-logic-compile';
import { explainMissing, isMissing } from './missing-info';
import type { Finding, MissingItem, NeedsInfoItem, ScoreResult } from './result-types';
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
  // What the schema just built has every key in canonical order (canonicalObject and
  // dictionaryRecord in input.ts) and only finite numbers, so the native writer's output is the
  // canonical JSON (a unit test holds the two equal).
  return scoreWithHash(parsed.data, ruleset, () => sha256Hex(JSON.stringify(parsed.data)));
}

/** Scores an input already parsed with AssessmentInputSchema (an endpoint that parsed it itself). */
export function scoreParsed(input: AssessmentInput, ruleset: LoadedRuleset | RulesetVersion): ScoreResult {
  // The input may have been assembled in code rather than parsed: the generic writer sorts its keys.
  return scoreWithHash(input, ruleset, () => contentSha256(input));
}

function scoreWithHash(input: AssessmentInput, ruleset: LoadedRuleset | RulesetVersion, inputSha256: () => string): ScoreResult {
  const compiled = resolve(ruleset);
  const issues = checkInputAgainstRuleset(input, compiled);
  if (issues.length > 0) throw new AssessmentInputError(issues);
  const { facts, problems } = buildFacts(input);
  // compiled.rules is already in report order (severity, area, id).
  const findings = compiled.rules.map((rule) => evaluateRule(rule, facts, input, compiled));
  const counts = { pass: 0, fail: 0, na: 0, needsInfo: 0, failedBySeverity: { critical: 0, major: 0, minor: 0 } };
  for (const f of findings) {
    if (f.outcome === 'pass') counts.pass += 1;
    else if (f.outcome === 'fail') {
      counts.fail += 1;
      counts.failedBySeverity[f.severity] += 1;
    } else if (f.outcome === 'n/a') counts.na += 1;
    else counts.needsInfo += 1;
  }
  const { version } = compiled;
  return {
    ruleset: { family: version.family, version: version.version, contentSha256: compiled.contentSha256 },
    inputSha256: inputSha256(),
    verdict: verdictOf(findings),
    complete: counts.needsInfo === 0,
    findings,
    areaScores: areaScores(findings, version),
    counts,
    needsInfo: collectNeedsInfo(findings, compiled),
    evidenceProblems: problems,
  };
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
  if (outcome === 'fail') result.hrn = rateFinding(input, rule.harm, rule.id, compiled.version.hrn, compiledRule.ratings);
  return result;
}

/**
 * A rule that does not apply to the gate's kind or class gives the same finding at every gate:
 * built once per compiled rule and shared, frozen (results are read-only data).
 */
const notApplicableFindings = new WeakMap<CompiledRule, Finding>();

function notApplicable(compiledRule: CompiledRule, input: AssessmentInput, compiled: CompiledRuleset): Finding {
  let finding = notApplicableFindings.get(compiledRule);
  if (!finding)
    notApplicableFindings.set(compiledRule, (finding = Object.freeze(makeFinding(compiledRule, 'n/a', NOTHING_MISSING, NOTHING_OBSERVED, input, compiled))));
  return finding;
}

function evaluateRule(compiledRule: CompiledRule, facts: Facts, input: AssessmentInput, compiled: CompiledRuleset): Finding {
  if (!compiledRule.gateKinds.has(input.profile.kind) || !compiledRule.usageClasses.has(input.profile.usageClass)) {
    return notApplicable(compiledRule, input, compiled);
  }
  // Each fact the rule looks at is read once: observed values, applicability and requirements share the reads.
  const paths = compiledRule.observed;
  const values = new Array<unknown>(paths.length);
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
    for (let i = 0; i < at.length; i++) if (isMissing(values[at[i]!])) (unknown ??= []).push(compiledRule.appliesWhenRequires[i]!);
    if (unknown) {
      return makeFinding(compiledRule, 'needs_info', dedupe(unknown.flatMap((path) => explainMissing(path, facts, compiled))), observed, input, compiled);
    }
    if (!truthy(compiledRule.appliesWhen(facts))) return makeFinding(compiledRule, 'n/a', NOTHING_MISSING, observed, input, compiled);
  }
  let missing: MissingItem[] | null = null;
  const at = compiledRule.requiresAt;
  for (let i = 0; i < at.length; i++) {
    const value = values[at[i]!];
    // The auditor judged the question not to apply at this gate: so does the rule.
    if (value === 'na' && compiledRule.requiresAnswer[i]) return makeFinding(compiledRule, 'n/a', NOTHING_MISSING, observed, input, compiled);
    if (isMissing(value)) (missing ??= []).push(...explainMissing(compiledRule.requires[i]!, facts, compiled));
  }
  if (missing) return makeFinding(compiledRule, 'needs_info', dedupe(missing), observed, input, compiled);
  return makeFinding(compiledRule, truthy(compiledRule.condition(facts)) ? 'pass' : 'fail', NOTHING_MISSING, observed, input, compiled);
}

function dedupe(items: MissingItem[]): MissingItem[] {
  const seen = new Set<string>();
  return items.filter((item) => (seen.has(item.key) ? false : (seen.add(item.key), true)));
}

/** Where a needed item sorts: questions in walk order first, then derived facts by key. */
const needRanks = new WeakMap<CompiledRuleset, Map<string, number>>();

function needRank(key: string, compiled: CompiledRuleset): number {
  let ranks = needRanks.get(compiled);
  if (!ranks) {
    const order = compiled.version.questions.map((q, i) => ({ fact: factKeyOfQuestion(q), section: compiled.sectionRank.get(q.section) ?? 0, i }));
    order.sort((a, b) => a.section - b.section || a.i - b.i);
    ranks = new Map(order.map((o, rank) => [o.fact, rank]));
    needRanks.set(compiled, ranks);
  }
  return ranks.get(key) ?? Number.MAX_SAFE_INTEGER;
}

function collectNeedsInfo(findings: readonly Finding[], compiled: CompiledRuleset): NeedsInfoItem[] {
  let byKey: Map<string, NeedsInfoItem> | null = null;
  for (const f of findings) {
    for (const item of f.missing) {
      byKey ??= new Map();
      let entry = byKey.get(item.key);
      if (!entry) byKey.set(item.key, (entry = { key: item.key, prompt: item.prompt, ruleIds: [] }));
      entry.ruleIds.push(f.ruleId);
    }
  }
  if (!byKey) return [];
  const items = [...byKey.values()];
  for (const item of items) item.ruleIds.sort();
  return items.sort((a, b) => needRank(a.key, compiled) - needRank(b.key, compiled) || (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
}
