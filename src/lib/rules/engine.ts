/**
 * Scores a gate: `score(input, rulesetVersion)` builds the facts, runs every enabled rule's
 * compiled condition, rates failing findings (HRN), scores each hazard area and gives the verdict.
 *
 * Deterministic by construction: no clock, no randomness, findings in a fixed order (severity,
 * then the version's area order, then rule id), and every collection built in a stable order, so
 * the same input and version give byte-identical canonical JSON and the same SHA-256.
 */
import { areaScores } from './area-scores';
import { compileRuleset, readFact, type CompiledRule, type CompiledRuleset } from './compile';
import { buildFacts, type Facts } from './facts';
import { rateFinding } from './finding-hrn';
import { contentSha256 } from './hash';
import { AssessmentInputSchema, type AssessmentInput } from './input';
import { AssessmentInputError, checkInputAgainstRuleset, issuesFromZod } from './input-check';
import { truthy } from './json-logic-compile';
import { explainMissing, isMissing } from './missing-info';
import type { Finding, MissingItem, NeedsInfoItem, ScoreResult } from './result-types';
import type { RulesetVersion } from './ruleset-schema';
import { verdictOf } from './verdict';
import { SEVERITIES, type Outcome, type Severity } from './vocabulary';

/** A validated version with its content hash, as loadRulesetFile returns it. */
export interface LoadedRuleset {
  version: RulesetVersion;
  contentSha256: string;
}

const SEVERITY_RANK: ReadonlyMap<Severity, number> = new Map(SEVERITIES.map((s, i) => [s, i]));

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
  const parsed = AssessmentInputSchema.safeParse(input);
  if (!parsed.success) throw new AssessmentInputError(issuesFromZod(parsed.error));
  return scoreParsed(parsed.data, ruleset);
}

/** Scores an input already parsed with AssessmentInputSchema (an endpoint that parsed it itself). */
export function scoreParsed(input: AssessmentInput, ruleset: LoadedRuleset | RulesetVersion): ScoreResult {
  const compiled = resolve(ruleset);
  const issues = checkInputAgainstRuleset(input, compiled);
  if (issues.length > 0) throw new AssessmentInputError(issues);
  const { facts, problems } = buildFacts(input);
  const findings = compiled.rules.map((rule) => evaluateRule(rule, facts, input, compiled));
  findings.sort((a, b) => compareFindings(a, b, compiled));
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
    inputSha256: contentSha256(input),
    verdict: verdictOf(findings),
    complete: counts.needsInfo === 0,
    findings,
    areaScores: areaScores(findings, version),
    counts,
    needsInfo: collectNeedsInfo(findings, compiled),
    evidenceProblems: problems,
  };
}

function compareFindings(a: Finding, b: Finding, compiled: CompiledRuleset): number {
  const bySeverity = (SEVERITY_RANK.get(a.severity) ?? 0) - (SEVERITY_RANK.get(b.severity) ?? 0);
  if (bySeverity !== 0) return bySeverity;
  const byArea = (compiled.areaRank.get(a.area) ?? 0) - (compiled.areaRank.get(b.area) ?? 0);
  if (byArea !== 0) return byArea;
  return a.ruleId < b.ruleId ? -1 : a.ruleId > b.ruleId ? 1 : 0;
}

function evaluateRule(compiledRule: CompiledRule, facts: Facts, input: AssessmentInput, compiled: CompiledRuleset): Finding {
  const { rule } = compiledRule;
  const finding = (outcome: Outcome, missing: MissingItem[] = [], observed: Record<string, unknown> = {}): Finding => {
    const params: Finding['params'] = {};
    for (const [name, param] of Object.entries(rule.params)) params[name] = 'unit' in param ? { value: param.value, unit: param.unit } : { value: param.value };
    const result: Finding = {
      ruleId: rule.id,
      title: rule.title,
      area: rule.area,
      severity: rule.severity,
      outcome,
      missing,
      observed,
      params,
      remediation: rule.remediation,
      caution: rule.caution,
      reference: rule.reference,
    };
    if (rule.local) result.local = true;
    if (outcome === 'fail') result.hrn = rateFinding(input, rule.harm, rule.id, compiled.version.hrn);
    return result;
  };

  if (!compiledRule.gateKinds.has(input.profile.kind) || !compiledRule.usageClasses.has(input.profile.usageClass)) return finding('n/a');
  const observed: Record<string, unknown> = {};
  for (const path of compiledRule.observed) {
    const value = readFact(facts, path);
    if (!isMissing(value)) observed[path.key] = value;
  }
  if (compiledRule.appliesWhen) {
    const unknown = compiledRule.appliesWhenRequires.filter((path) => isMissing(readFact(facts, path)));
    if (unknown.length > 0) return finding('needs_info', unknown.flatMap((path) => explainMissing(path, facts, compiled)), observed);
    if (!truthy(compiledRule.appliesWhen(facts))) return finding('n/a', [], observed);
  }
  const missing: MissingItem[] = [];
  for (const path of compiledRule.requires) {
    const value = readFact(facts, path);
    // The auditor judged the question not to apply at this gate: so does the rule.
    if (value === 'na' && path.segments[0] === 'answers') return finding('n/a', [], observed);
    if (isMissing(value)) missing.push(...explainMissing(path, facts, compiled));
  }
  if (missing.length > 0) return finding('needs_info', dedupe(missing), observed);
  return finding(truthy(compiledRule.condition(facts)) ? 'pass' : 'fail', [], observed);
}

function dedupe(items: MissingItem[]): MissingItem[] {
  const seen = new Set<string>();
  return items.filter((item) => (seen.has(item.key) ? false : (seen.add(item.key), true)));
}

function collectNeedsInfo(findings: readonly Finding[], compiled: CompiledRuleset): NeedsInfoItem[] {
  const byKey = new Map<string, NeedsInfoItem>();
  for (const f of findings) {
    for (const item of f.missing) {
      const entry = byKey.get(item.key) ?? { key: item.key, prompt: item.prompt, ruleIds: [] };
      entry.ruleIds.push(f.ruleId);
      byKey.set(item.key, entry);
    }
  }
  const questionOrder = new Map(compiled.version.questions.map((q, i) => [q.key, i]));
  const rank = (key: string): [number, number, number, string] => {
    const q = compiled.questionByFact.get(key);
    if (!q) return [1, 0, 0, key];
    return [0, compiled.sectionRank.get(q.section) ?? 0, questionOrder.get(q.key) ?? 0, key];
  };
  const items = [...byKey.values()];
  for (const item of items) item.ruleIds.sort();
  return items.sort((a, b) => {
    const [ra, rb] = [rank(a.key), rank(b.key)];
    for (let i = 0; i < 3; i++) if (ra[i] !== rb[i]) return (ra[i] as number) - (rb[i] as number);
    return ra[3] < rb[3] ? -1 : ra[3] > rb[3] ? 1 : 0;
  });
}
