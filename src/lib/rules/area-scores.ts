/**
 * Area scores, 0–100 per hazard area, so a report can show where a gate is weak at a glance.
 *
 * Weighting: each applicable rule weighs its severity's weight from the ruleset
 * (`scoring.severityWeights`, e.g. critical 5, major 3, minor 1). Score = 100 × weight of
 * passed rules ÷ weight of applicable rules, rounded to a whole number. `n/a` rules are left
 * out; `needs_info` rules count as not passed (an unchecked hazard is not a cleared one). An
 * area with no applicable rule scores null rather than a flattering 100.
 */
import type { RulesetVersion } from './ruleset-schema';
import type { Finding } from './result-types';

/** Scores per area of the version, in the version's area order. */
export function areaScores(findings: readonly Finding[], version: RulesetVersion): Record<string, number | null> {
  const weights = version.scoring.severityWeights;
  const totals = new Map<string, { passed: number; applicable: number }>();
  for (const area of version.areas) totals.set(area.key, { passed: 0, applicable: 0 });
  for (const finding of findings) {
    if (finding.outcome === 'n/a') continue;
    const total = totals.get(finding.area);
    if (!total) continue;
    const weight = weights[finding.severity];
    total.applicable += weight;
    if (finding.outcome === 'pass') total.passed += weight;
  }
  const scores: Record<string, number | null> = {};
  for (const [area, total] of totals) scores[area] = total.applicable === 0 ? null : Math.round((100 * total.passed) / total.applicable);
  return scores;
}
