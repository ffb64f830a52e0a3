/**
 * How a version scores, in words for the ruleset page: HRN bands with the edge convention the
 * version declares (which band a value exactly on an edge falls in), area caps, likelihood by
 * severity and the re-inspection plan. Pure: the page and the unit tests call it.
 */
import type { HrnTable, RulesetVersion } from '@/lib/rules/ruleset-schema';

/** One band with the range it holds, written out for its edges. */
export interface BandRow {
  key: string;
  label: string;
  range: string;
}

const n = (value: number): string => String(value);

/** The version's edge convention, in one sentence. */
export function bandEdgesSentence(hrn: HrnTable): string {
  return (hrn.bandEdges ?? 'upper_inclusive') === 'lower_inclusive'
    ? 'A value exactly on an edge falls in the higher band (each band starts at its lower edge).'
    : 'A value exactly on an edge falls in the lower band (each band includes its upper edge).';
}

/** Each band with its range: "from 50 up to but not including 100" or "over 50 up to and including 100". */
export function bandRows(hrn: HrnTable): BandRow[] {
  const lowerInclusive = hrn.bandEdges === 'lower_inclusive';
  return hrn.bands.map((band, i) => {
    const from = i === 0 ? null : hrn.bands[i - 1]!.upTo;
    let range: string;
    if (lowerInclusive) {
      if (from === null) range = band.upTo === null ? 'any value' : `under ${n(band.upTo)}`;
      else range = band.upTo === null ? `${n(from)} and over` : `from ${n(from)} up to but not including ${n(band.upTo)}`;
    } else if (from === null) range = band.upTo === null ? 'any value' : `up to and including ${n(band.upTo)}`;
    else range = band.upTo === null ? `over ${n(from)}` : `over ${n(from)} up to and including ${n(band.upTo)}`;
    return { key: band.key, label: band.label, range };
  });
}

/** Scoring facts beyond the bands, one line each (empty when the version says nothing more). */
export function scoringLines(version: RulesetVersion): string[] {
  const lines: string[] = [];
  const w = version.scoring.severityWeights;
  lines.push(`Area scores weigh critical rules ${n(w.critical)}, major ${n(w.major)}, minor ${n(w.minor)}; rules that do not apply are left out and unchecked ones count as not passed.`);
  if (version.scoring.criticalFailureAreaCap !== undefined) lines.push(`An area with a failing critical rule scores at most ${n(version.scoring.criticalFailureAreaCap)}.`);
  const step = version.hrn.likelihoodStepBySeverity;
  if (step) {
    const say = (by: number) => (by === 0 ? 'as derived' : by > 0 ? `${by} step${by === 1 ? '' : 's'} more likely` : `${-by} step${by === -1 ? '' : 's'} less likely`);
    lines.push(`Default HRN likelihood by severity: critical ${say(step.critical)}, major ${say(step.major)}, minor ${say(step.minor)}.`);
  }
  return lines;
}

/** The re-inspection plan, one line per verdict; empty when the version has none. */
export function reinspectionLines(version: RulesetVersion): string[] {
  const plan = version.reinspection;
  if (!plan) return [];
  const days = (byClass: Record<'1' | '2' | '3' | '4', number>) => (['1', '2', '3', '4'] as const).map((c) => `class ${c}: ${byClass[c]} days`).join(', ');
  return [`Clear: ${days(plan.clearAfterDays)}.`, `Remedy: ${days(plan.remedyAfterDays)}.`, 'Withdraw: when the fixes are reported (no calendar date while the gate is out of automatic use).'];
}
