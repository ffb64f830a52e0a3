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
import type { RulesetVersion } from './ruleset-schema';
import type { Finding } from './result-types';

/** Scores per area of the version, in the version's area order. */
export function areaScores(
  findings: readonly Finding[],
  version: RulesetVersion,
): Record<string, number | null> {
  const weights = version.scoring.severityWeights;
  const { areas } = version;
  // Indexed by the area's place in the version: a handful of areas, found by a scan (no Map, no iterator).
  const passed = new Array<number>(areas.length).fill(0);
  const applicable = new Array<number>(areas.length).fill(0);
  const criticalFailed = new Array<boolean>(areas.length).fill(false);
  for (let f = 0; f < findings.length; f++) {
    const finding = findings[f]!;
    if (finding.outcome === 'n/a') continue;
    let at = 0;
    while (at < areas.length && areas[at]!.key !== finding.area) at++;
    if (at === areas.length) continue;
    const weight = weights[finding.severity];
    applicable[at]! += weight;
    if (finding.outcome === 'pass') passed[at]! += weight;
    else if (finding.outcome === 'fail' && finding.severity === 'critical') criticalFailed[at] = true;
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
