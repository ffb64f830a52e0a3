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
import { SITE_CODES } from './finding-hrn';
import type { FindingHrn } from './result-types';
import type { CrossCheck, ImpliedZone, RulesetQuestion, RulesetRule, RulesetVersion } from './ruleset-schema';
import { SEVERITIES, type GateKind, type HazardArea, type UsageClass } from './vocabulary';

/** A fact path ready to read: `calc.force.worst.peakN` → ['calc','force','worst','peakN']. */
export interface FactPath {
  readonly key: string;
  readonly segments: readonly string[];
  /** Reads this path from a fact object; undefined when any step is absent. */
  readonly read?: (facts: unknown) => unknown;
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
  /** Where each of `requires` sits in `observed` (each fact is read once per rule). */
  readonly requiresAt: readonly number[];
  /** Where each of `appliesWhenRequires` sits in `observed`. */
  readonly appliesWhenRequiresAt: readonly number[];
  /**
   * HRN ratings of this rule's failing finding without an override, by site (see rateFinding):
   * a memo filled as gates are scored, so findings that rate the same share one frozen rating.
   */
  readonly ratings: Array<FindingHrn | undefined>;
  /** Param values as conditions see them (`params.<name>`), for the reference evaluator and reports. */
  readonly paramValues: Readonly<Record<string, unknown>>;
  /** Params as a finding reports them (value and unit), built once and frozen. */
  readonly findingParams: Readonly<Record<string, { value: unknown; unit?: string }>>;
}

/** An implied entrapment zone with its condition compiled (its rule's params folded in). */
export interface CompiledImpliedZone {
  readonly zone: ImpliedZone['zone'];
  readonly direction: ImpliedZone['direction'];
  readonly gateKinds: ReadonlySet<GateKind>;
  readonly when: CompiledLogic;
}

/** A cross-check with its condition compiled: true when the record contradicts itself. */
export interface CompiledCrossCheck {
  readonly check: CrossCheck;
  readonly when: CompiledLogic;
  /** The contradicted facts, pre-split (`answers.photoEyeTestReverses` → ['answers', …]). */
  readonly facts: readonly FactPath[];
}

export interface CompiledRuleset {
  readonly version: RulesetVersion;
  /** Zones measurements imply, when the version declares any (null: none). */
  readonly impliedZones: readonly CompiledImpliedZone[] | null;
  /** Cross-checks of the version (empty when none). */
  readonly crossChecks: readonly CompiledCrossCheck[];
  readonly contentSha256: string;
  /** Enabled rules only, in the order findings are reported: severity, then area order, then id. */
  readonly rules: readonly CompiledRule[];
  readonly questionByKey: ReadonlyMap<string, RulesetQuestion>;
  readonly ruleIds: ReadonlySet<string>;
  /** HRN level keys of the version's table, to check an auditor's overrides. */
  readonly hrnKeys: Readonly<Record<'lo' | 'fe' | 'dph' | 'np', ReadonlySet<string>>>;
  readonly areaRank: ReadonlyMap<HazardArea, number>;
  readonly questionByFact: ReadonlyMap<string, RulesetQuestion>;
  readonly sectionRank: ReadonlyMap<string, number>;
}

const byHash = new Map<string, CompiledRuleset>();
const byObject = new WeakMap<object, CompiledRuleset>();

function readerOf(segments: readonly string[]): (facts: unknown) => unknown {
  if (segments.length === 2) {
    const [group, name] = segments as [string, string];
    return (facts) => {
      const inner = (facts as Record<string, Record<string, unknown> | undefined>)[group];
      return inner === undefined || inner === null ? undefined : inner[name];
    };
  }
  // Deeper paths (`calc.entrapment.closing.compliant2016`): one closure per depth, no loop over the segments.
  if (segments.length === 3) {
    const [a, b, c] = segments as [string, string, string];
    return (facts) => {
      const first = (facts as Record<string, Record<string, unknown> | undefined>)[a];
      if (first === undefined || first === null) return undefined;
      const second = first[b] as Record<string, unknown> | undefined | null;
      return second === undefined || second === null ? undefined : second[c];
    };
  }
  if (segments.length === 4) {
    const [a, b, c, d] = segments as [string, string, string, string];
    return (facts) => {
      const first = (facts as Record<string, Record<string, unknown> | undefined>)[a];
      if (first === undefined || first === null) return undefined;
      const second = first[b] as Record<string, unknown> | undefined | null;
      if (second === undefined || second === null) return undefined;
      const third = second[c] as Record<string, unknown> | undefined | null;
      return third === undefined || third === null ? undefined : third[d];
    };
  }
  return (facts) => walk(facts, segments);
}

const toPath = (key: string): FactPath => {
  const segments = key.split('.');
  return { key, segments, read: readerOf(segments) };
};

function walk(facts: unknown, segments: readonly string[]): unknown {
  let current: unknown = facts;
  for (const segment of segments) {
    if (current === null || current === undefined) return undefined;
    current = (current as Record<string, unknown>)[segment];
  }
  return current;
}

/** Reads a fact by its pre-split path; undefined when any step is absent. */
export function readFact(facts: unknown, path: FactPath): unknown {
  if (path.read) return path.read(facts);
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

function indexIn(list: readonly string[], key: string): number {
  const at = list.indexOf(key);
  if (at < 0) throw new Error(`compile: ${key} is not among the facts the rule looks at`);
  return at;
}

function paramValuesOf(rule: RulesetRule | undefined): Record<string, unknown> {
  const paramValues: Record<string, unknown> = {};
  for (const [name, param] of Object.entries(rule?.params ?? {})) paramValues[name] = param.value;
  return paramValues;
}

function compileImpliedZone(zone: ImpliedZone, rules: readonly RulesetRule[]): CompiledImpliedZone {
  const rule = rules.find((r) => r.id === zone.rule);
  return {
    zone: zone.zone,
    direction: zone.direction,
    gateKinds: new Set(zone.gateKinds),
    when: compileLogic(zone.when, { constants: { prefix: 'params', values: paramValuesOf(rule) } }),
  };
}

function compileCrossCheck(check: CrossCheck): CompiledCrossCheck {
  return {
    check,
    when: compileLogic(check.when, { constants: { prefix: 'params', values: {} } }),
    facts: check.facts.map(toPath),
  };
}

function compileRule(rule: RulesetRule): CompiledRule {
  const paramValues = paramValuesOf(rule);
  const constants = { prefix: 'params', values: paramValues };
  const findingParams: Record<string, { value: unknown; unit?: string }> = {};
  for (const [name, param] of Object.entries(rule.params)) {
    findingParams[name] = Object.freeze(
      'unit' in param ? { value: param.value, unit: param.unit } : { value: param.value },
    );
  }
  const optional = new Set(rule.optional ?? []);
  const appliesVars = rule.appliesWhen === undefined ? [] : factVars(rule.appliesWhen);
  const observed = [
    ...new Set([...rule.requires, ...optional, ...factVars(rule.condition), ...appliesVars]),
  ].sort();
  const appliesWhenRequires = appliesVars.filter((v) => !optional.has(v) && !FACT_CATALOGUE[v]?.always);
  return {
    rule,
    gateKinds: new Set(rule.appliesTo.gateKinds),
    usageClasses: new Set(rule.appliesTo.usageClasses),
    condition: compileLogic(rule.condition, { constants }),
    appliesWhen: rule.appliesWhen === undefined ? null : compileLogic(rule.appliesWhen, { constants }),
    requires: rule.requires.map(toPath),
    appliesWhenRequires: appliesWhenRequires.map(toPath),
    observed: observed.map(toPath),
    requiresAt: rule.requires.map((key) => indexIn(observed, key)),
    appliesWhenRequiresAt: appliesWhenRequires.map((key) => indexIn(observed, key)),
    // Filled in place, one slot per site: a packed array, not a sparse one.
    ratings: new Array<FindingHrn | undefined>(SITE_CODES).fill(undefined),
    paramValues,
    findingParams: Object.freeze(findingParams),
  };
}

const SEVERITY_RANK = new Map<string, number>(SEVERITIES.map((s, i) => [s, i]));

/** Findings order: severity, then the version's area order, then rule id (code-unit order, no locale). */
function reportOrder(rules: RulesetRule[], areaRank: ReadonlyMap<string, number>): RulesetRule[] {
  return [...rules].sort(
    (a, b) =>
      (SEVERITY_RANK.get(a.severity) ?? 0) - (SEVERITY_RANK.get(b.severity) ?? 0) ||
      (areaRank.get(a.area) ?? 0) - (areaRank.get(b.area) ?? 0) ||
      (a.id < b.id ? -1 : a.id > b.id ? 1 : 0),
  );
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
    const areaRank = new Map(version.areas.map((area, i) => [area.key, i]));
    const keysOf = (levels: ReadonlyArray<{ key: string }>) => new Set(levels.map((level) => level.key));
    compiled = {
      version,
      contentSha256: sha,
      impliedZones:
        version.impliedZones && version.impliedZones.length > 0
          ? version.impliedZones.map((zone) => compileImpliedZone(zone, version.rules))
          : null,
      crossChecks: (version.crossChecks ?? []).map(compileCrossCheck),
      rules: reportOrder(
        version.rules.filter((rule) => rule.enabled),
        areaRank,
      ).map(compileRule),
      areaRank,
      questionByFact: new Map(version.questions.map((q) => [factKeyOfQuestion(q), q])),
      questionByKey: new Map(version.questions.map((q) => [q.key, q])),
      ruleIds: new Set(version.rules.map((r) => r.id)),
      hrnKeys: {
        lo: keysOf(version.hrn.lo),
        fe: keysOf(version.hrn.fe),
        dph: keysOf(version.hrn.dph),
        np: keysOf(version.hrn.np),
      },
      sectionRank: new Map(version.sections.map((section, i) => [section.key, i])),
    };
    byHash.set(sha, compiled);
  }
  byObject.set(version, compiled);
  return compiled;
}
