/**
 * Assessments in words: statuses, verdicts (label, explanation, colours), severities,
 * finding outcomes, visit purposes and hazard areas.
 */
import type { Severity, Verdict } from '@/lib/rules/vocabulary';
import { humanise } from './humanise';

export type AssessmentStatus = 'draft' | 'scored' | 'awaiting_signature' | 'signed' | 'superseded';

export const STATUS_LABEL: Record<AssessmentStatus, string> = {
  draft: 'Draft',
  scored: 'Submitted, not sent',
  awaiting_signature: 'Awaiting signature',
  signed: 'Signed',
  superseded: 'Replaced by a revision',
};

export function statusLabel(status: string): string {
  return STATUS_LABEL[status as AssessmentStatus] ?? humanise(status);
}

/**
 * The verdict as a status, never as an order on a button: its label says what happens to the
 * gate, and the explanation says why and what to do.
 */
export const VERDICT_WORDS: Record<
  Verdict,
  { label: string; short: string; headline: string; explanation: string; owner: string }
> = {
  clear: {
    label: 'No hazard found above minor',
    headline: 'No hazard above minor was found.',
    short: 'No hazard above minor',
    explanation:
      'Nothing above a minor item fails. Keep the gate maintained and check it again when it is due.',
    owner:
      'The gate met every check that matters for safety on the day of the visit. Keep it maintained and have it checked again at the next due date.',
  },
  remedy: {
    label: 'Fix by a date',
    headline: 'Hazards were found that must be fixed.',
    short: 'Fix by a date',
    explanation:
      'Hazards were found that must be fixed. The gate may stay in use, following the cautions, while the fixes are arranged by an agreed date.',
    owner:
      'The gate may stay in use while the fixes listed below are arranged, following the cautions in this report. Agree a date for the work with your installer.',
  },
  withdraw: {
    label: 'Take out of automatic use',
    headline: 'At least one critical hazard was found.',
    short: 'Out of automatic use',
    explanation:
      'A critical hazard was found. Switch the operator off or to manual release until the critical fixes are done and checked.',
    owner:
      'Stop automatic operation now (switch the operator off or to manual release) and keep it off until the critical fixes below are done and checked.',
  },
};

export function verdictLabel(verdict: string | null | undefined): string {
  return verdict ? (VERDICT_WORDS[verdict as Verdict]?.label ?? humanise(verdict)) : 'Not scored yet';
}

/** Text and background classes with at least 4.5:1 contrast, for sunlight. */
export const VERDICT_CLASS: Record<Verdict, string> = {
  clear: 'bg-clear text-white',
  remedy: 'bg-remedy text-white',
  withdraw: 'bg-withdraw text-white',
};

export const SEVERITY_LABEL: Record<Severity, string> = {
  critical: 'Critical',
  major: 'Major',
  minor: 'Minor',
};

/** Severity chips: critical in the withdraw red, major in the remedy amber, minor quiet. */
export const SEVERITY_CLASS: Record<Severity, string> = {
  critical: 'bg-withdraw text-white',
  major: 'bg-remedy text-white',
  minor: 'bg-iron-100 text-iron-800',
};

export function severityLabel(severity: string): string {
  return SEVERITY_LABEL[severity as Severity] ?? humanise(severity);
}

export const OUTCOME_LABEL: Record<'pass' | 'fail' | 'n/a' | 'needs_info', string> = {
  pass: 'Passes',
  fail: 'Fails',
  'n/a': 'Does not apply',
  needs_info: 'Needs information',
};

export const PURPOSE_LABEL: Record<string, string> = {
  inspection: 'Inspection',
  service: 'Service visit',
  handover: 'Handover of a new install',
};

const each = (pick: (w: (typeof VERDICT_WORDS)[Verdict]) => string) =>
  Object.fromEntries(Object.entries(VERDICT_WORDS).map(([k, w]) => [k, pick(w)])) as Record<Verdict, string>;

export const VERDICT_LABEL = each((w) => w.label);

/** Short forms for the status bar. */
export const VERDICT_SHORT = each((w) => w.short);

export const VERDICT_EXPLANATION = each((w) => w.explanation);

/** The verdict as coloured text on white (a status, not a filled button). */
export const VERDICT_TEXT_CLASS: Record<Verdict, string> = {
  clear: 'text-clear',
  remedy: 'text-remedy',
  withdraw: 'text-withdraw',
};

export const VERDICT_ICON: Record<Verdict, string> = { clear: '✓', remedy: '!', withdraw: '■' };

/** Hazard areas, for when the ruleset's own titles are not at hand. */
export const AREA_LABEL: Record<string, string> = {
  pinch: 'Pinch and crush points',
  gaps: 'Gaps and openings',
  signage: 'Warning signage',
  force: 'Force and reversal',
  sensing: 'Entrapment sensing',
  controls: 'Controls',
  build: 'Gate construction',
  power: 'Power and wiring',
  handover: 'Handover',
};
