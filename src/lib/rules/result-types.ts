/**
 * The scoring result: what the report renders and what is hashed and signed. Every field is
 * plain JSON; nothing depends on the clock or on chance.
 */
import type { EvidenceProblem } from './facts';
import type { RulesetReference } from './ruleset-schema';
import type { HazardArea, Outcome, Severity, Verdict } from './vocabulary';

/** Something a finding needed and did not get, in words the auditor can act on. */
export interface MissingItem {
  key: string;
  prompt: string;
}

/** HRN of a failing finding: factors with the table keys they came from. */
export interface FindingHrn {
  lo: number;
  fe: number;
  dph: number;
  np: number;
  value: number;
  band: string;
  keys: { lo: string; fe: string; dph: string; np: string };
  /** The auditor's reason, when they changed the derived factors. */
  overrideReason?: string;
}

export interface Finding {
  ruleId: string;
  title: string;
  area: HazardArea;
  severity: Severity;
  outcome: Outcome;
  missing: MissingItem[];
  /** The fact values the rule looked at (absent facts are listed under `missing` instead). */
  observed: Record<string, unknown>;
  /** The thresholds it judged them against, with units. */
  params: Record<string, { value: unknown; unit?: string }>;
  hrn?: FindingHrn;
  remediation: string;
  caution: string;
  reference: RulesetReference;
  local?: true;
}

export interface OutcomeCounts {
  pass: number;
  fail: number;
  na: number;
  needsInfo: number;
}

/** One needed item across the whole assessment, and the rules waiting on it. */
export interface NeedsInfoItem extends MissingItem {
  ruleIds: string[];
}

/** Answers that contradict the rest of the record; their facts were not accepted. */
export interface Contradiction {
  id: string;
  message: string;
  /** The facts left out until resolved (`answers.photoEyeTestReverses`). */
  facts: string[];
}

/** When the gate is to be seen again: after a number of days, or as soon as its fixes are reported. */
export type Reinspection = { when: 'after_days'; afterDays: number } | { when: 'fixes_reported' };

export interface ScoreResult {
  ruleset: { family: string; version: string; contentSha256: string };
  /** SHA-256 of the parsed input's canonical JSON: ties the result to exactly what was scored. */
  inputSha256: string;
  verdict: Verdict;
  /** True when no finding needs information. */
  complete: boolean;
  findings: Finding[];
  /** 0–100 per hazard area; null where no rule applies. See area-scores.ts for the weighting. */
  areaScores: Record<string, number | null>;
  counts: OutcomeCounts & { failedBySeverity: Record<Severity, number> };
  needsInfo: NeedsInfoItem[];
  /** Evidence the calculators refused (e.g. a force trace sampled too slowly). */
  evidenceProblems: EvidenceProblem[];
  /** Contradictions found by the version's cross-checks (versions that declare cross-checks). */
  contradictions?: Contradiction[];
  /** When to visit again, by verdict and usage class (versions that declare a re-inspection plan). */
  reinspection?: Reinspection;
}
