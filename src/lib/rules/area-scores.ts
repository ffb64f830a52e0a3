/**
 * Area scores, 0–100 per hazard area, so a report can show where a gate is weak at a glance.
 *
 * Weighting: each applicable rule weighs its severity's weight from the ruleset
 * (`scoring.severityWeights`, e.g. critical 5, major 3, minor 1). Score = 100 × weight of
 * passed rules ÷ weight of applicable rules, rounded to a whole number. `n/a` rules are left
 * out; `needs_info` rules count as not passed (an unchecked hazard is not a cleared one). An
 * area with no applicable rule scores null rather than a flattering 100.
 *
 * A version with `scoring.criticalFailureAreaCap` holds an area that has a failing critical rule
 * at or below that cap, however many lesser rules pass beside it: one critical failure is
 * enough to take a gate out of automatic use, and its area must not read as mostly sound.
 */
import type { CompiledRuleset } from './compile';
import type { RulesetVersion } from './ruleset-schema';
import type { Finding } from './result-types';

/** Per compiled version: the place of each rule's area among the version's areas, by the rule's place (-1: none). */
const areaIndexes = new WeakMap<CompiledRuleset, Int32Array>();

function areaIndexesOf(compiled: CompiledRuleset): Int32Array {
  let indexes = areaIndexes.get(compiled);
  if (!indexes) {
    const { areas } = compiled.version;
    indexes = Int32Array.from(compiled.rules, (r) => areas.findIndex((area) => area.key === r.rule.area));
    areaIndexes.set(compiled, indexes);
  }
  return indexes;
}

/**
 * Scores per area of the version, in the version's area order. `compiled`: the version the
 * findings were made with, in its rule order (as the engine makes them), so each finding's area
 * is found by its rule's place instead of a search; a finding of another rule is still searched.
 */
export function areaScores(
  findings: readonly Finding[],
  version: RulesetVersion,
  compiled?: CompiledRuleset,
): Record<string, number | null> {
  const weights = version.scoring.severityWeights;
  const { areas } = version;
  const indexes = compiled && compiled.version === version ? areaIndexesOf(compiled) : null;
  const rules = compiled?.rules;
  // Indexed by the area's place in the version (zero-filled typed arrays: no Map, no iterator).
  const passed = new Float64Array(areas.length);
  const applicable = new Float64Array(areas.length);
  const criticalFailed = new Uint8Array(areas.length);
  for (let f = 0; f < findings.length; f++) {
    const finding = findings[f]!;
    if (finding.outcome === 'n/a') continue;
    let at: number;
    if (indexes !== null && f < indexes.length && rules![f]!.rule.id === finding.ruleId) at = indexes[f]!;
    else {
      at = 0;
      while (at < areas.length && areas[at]!.key !== finding.area) at++;
    }
    if (at < 0 || at === areas.length) continue;
    const weight = weights[finding.severity];
    applicable[at]! += weight;
    if (finding.outcome === 'pass') passed[at]! += weight;
    else if (finding.outcome === 'fail' && finding.severity === 'critical') criticalFailed[at] = 1;
  }
  const cap = version.scoring.criticalFailureAreaCap;
  const scores: Record<string, number | null> = {};
  for (let i = 0; i < areas.length; i++) {
    if (applicable[i] === 0) {
      scores[areas[i]!.key] = null;
      continue;
    }
    const score = Math.round((100 * passed[i]!) / applicable[i]!);
    scores[areas[i]!.key] = cap !== undefined && criticalFailed[i] ? Math.min(score, cap) : score;
  }
  return scores;
}
