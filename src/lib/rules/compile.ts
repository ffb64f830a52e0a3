/**
 * Compiles a ruleset version once: every rule's JSON Logic (condition and appliesWhen) becomes a
 * closure with its params folded in as constants, and every fact path it needs is split into
 * segments ahead of time. Compiled versions are cached by content SHA-256 (and by object identity,
 * so a caller holding the same parsed version pays no hashing at all).
 */
import { compileLogic, type CompiledLogic } from './json-logic-compile';
import { analyseLogic } from './json-logic-analysis';
import { FACT_CATALOGUE } from './fact-catalogue';
import { contentSha256 } from './hash';
import { factKeyOfQuestion } from './ruleset-references';
import type { RulesetQuestion, RulesetRule, RulesetVersion } from './ruleset-schema';
import type { GateKind, HazardArea, UsageClass } from './vocabulary';

/** A fact path ready to read: `calc.force.worst.peakN` → ['calc','force','worst','peakN']. */
export interface FactPath {
  readonly key: string;
  readonly segments: readonly string[];
}

export interface CompiledRule {
  readonly rule: RulesetRule;
  readonly gateKinds: ReadonlySet<GateKind>;
  readonly usageClasses: ReadonlySet<UsageClass>;
  readonly condition: CompiledLogic;
  readonly appliesWhen: CompiledLogic | null;
  /** Facts the condition cannot do without. */
  readonly requires: readonly FactPath[];
  /** Facts appliesWhen reads that are not optional: unknown applicability is needs_info, not n/a. */
  readonly appliesWhenRequires: readonly FactPath[];
  /** Every fact the rule looks at, reported as the finding's observed values. */
  readonly observed: readonly FactPath[];
  /** Param values as conditions see them (`params.<name>`), for the reference evaluator and reports. */
  readonly paramValues: Readonly<Record<string, unknown>>;
}

export interface CompiledRuleset {
  readonly version: RulesetVersion;
  readonly contentSha256: string;
  /** Enabled rules only, in file order. */
  readonly rules: readonly CompiledRule[];
  readonly areaRank: ReadonlyMap<HazardArea, number>;
  readonly questionByFact: ReadonlyMap<string, RulesetQuestion>;
  readonly sectionRank: ReadonlyMap<string, number>;
}

const byHash = new Map<string, CompiledRuleset>();
const byObject = new WeakMap<object, CompiledRuleset>();

const toPath = (key: string): FactPath => ({ key, segments: key.split('.') });

/** Reads a fact by its pre-split path; undefined when any step is absent. */
export function readFact(facts: unknown, path: FactPath): unknown {
  let current: unknown = facts;
  for (const segment of path.segments) {
    if (current === null || current === undefined) return undefined;
    current = (current as Record<string, unknown>)[segment];
  }
  return current;
}

function factVars(logic: unknown): string[] {
  const usage = analyseLogic(logic);
  return [...usage.vars, ...usage.missingKeys].filter((name) => !name.startsWith('params.'));
}

function compileRule(rule: RulesetRule): CompiledRule {
  const paramValues: Record<string, unknown> = {};
  for (const [name, param] of Object.entries(rule.params)) paramValues[name] = param.value;
  const constants = { prefix: 'params', values: paramValues };
  const optional = new Set(rule.optional ?? []);
  const appliesVars = rule.appliesWhen === undefined ? [] : factVars(rule.appliesWhen);
  const observed = new Set([...rule.requires, ...optional, ...factVars(rule.condition), ...appliesVars]);
  return {
    rule,
    gateKinds: new Set(rule.appliesTo.gateKinds),
    usageClasses: new Set(rule.appliesTo.usageClasses),
    condition: compileLogic(rule.condition, { constants }),
    appliesWhen: rule.appliesWhen === undefined ? null : compileLogic(rule.appliesWhen, { constants }),
    requires: rule.requires.map(toPath),
    appliesWhenRequires: appliesVars.filter((v) => !optional.has(v) && !FACT_CATALOGUE[v]?.always).map(toPath),
    observed: [...observed].sort().map(toPath),
    paramValues,
  };
}

/**
 * The compiled form of a version, built once per content. Pass the SHA-256 when it is already
 * known (loadRulesetFile gives it) to skip hashing on a cold cache.
 */
export function compileRuleset(version: RulesetVersion, knownSha256?: string): CompiledRuleset {
  const cached = byObject.get(version);
  if (cached) return cached;
  const sha = knownSha256 ?? contentSha256(version);
  let compiled = byHash.get(sha);
  if (!compiled) {
    compiled = {
      version,
      contentSha256: sha,
      rules: version.rules.filter((rule) => rule.enabled).map(compileRule),
      areaRank: new Map(version.areas.map((area, i) => [area.key, i])),
      questionByFact: new Map(version.questions.map((q) => [factKeyOfQuestion(q), q])),
      sectionRank: new Map(version.sections.map((section, i) => [section.key, i])),
    };
    byHash.set(sha, compiled);
  }
  byObject.set(version, compiled);
  return compiled;
}
