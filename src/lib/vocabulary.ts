/**
 * Words for people: every label, status, verdict, count and date that a page, island or e-mail
 * shows, in one place. The engine's codes (`awaiting_signature`, `needs_info`, rule ids) stay in
 * the data; whatever a person reads comes from here. Pure; shared by pages, islands and server.
 * (The codes themselves are listed in src/lib/rules/vocabulary.ts.)
 */

// ---------------------------------------------------------------------------------------------
// Dates, in the organisation's time zone (stored as timestamptz, shown locally)

export function formatDay(iso: string | Date | null, timeZone: string): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-US', { timeZone, dateStyle: 'medium' }).format(new Date(iso));
}

export function formatDayTime(iso: string | Date | null, timeZone: string): string {
  if (!iso) return '—';
  return new Intl.DateTimeFormat('en-US', { timeZone, dateStyle: 'medium', timeStyle: 'short' }).format(
    new Date(iso),
  );
}

/** A calendar date stored as `YYYY-MM-DD` (no time zone of its own), e.g. a due date: "Nov 17, 2027". */
export function formatCalendarDate(isoDate: string | null): string {
  if (!isoDate) return '—';
  return new Intl.DateTimeFormat('en-US', { timeZone: 'UTC', dateStyle: 'medium' }).format(
    new Date(`${isoDate.slice(0, 10)}T00:00:00Z`),
  );
}

// ---------------------------------------------------------------------------------------------
// Counts

const pluralRules = new Intl.PluralRules('en-US');

/**
 * "1 attachment", "2 attachments", "0 attachments". Pass the plural when it is not the
 * singular plus "s" (`count(3, 'leaf', 'leaves')`).
 */
export function count(n: number, singular: string, plural = `${singular}s`): string {
  return `${n.toLocaleString('en-US')} ${pluralRules.select(n) === 'one' ? singular : plural}`;
}

/** "in 1 day", "in 348 days", "today", "3 days overdue" for a distance in whole days. */
export function daysFromNow(days: number): string {
  if (days === 0) return 'today';
  return days > 0 ? `in ${count(days, 'day')}` : `${count(-days, 'day')} overdue`;
}

/** "a, b and c". */
export function listOf(items: readonly string[]): string {
  if (items.length <= 1) return items[0] ?? '';
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

// ---------------------------------------------------------------------------------------------
// Assessments

export type AssessmentStatus = 'draft' | 'scored' | 'awaiting_signature' | 'signed' | 'superseded';
export type VerdictCode = 'clear' | 'remedy' | 'withdraw';

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
  VerdictCode,
  { label: string; short: string; explanation: string; owner: string }
> = {
  clear: {
    label: 'No hazard found above minor',
    short: 'No hazard above minor',
    explanation:
      'Nothing above a minor item fails. Keep the gate maintained and check it again when it is due.',
    owner:
      'The gate met every check that matters for safety on the day of the visit. Keep it maintained and have it checked again at the next due date.',
  },
  remedy: {
    label: 'Fix by a date',
    short: 'Fix by a date',
    explanation:
      'Hazards were found that must be fixed. The gate may stay in use, following the cautions, while the fixes are arranged by an agreed date.',
    owner:
      'The gate may stay in use while the fixes listed below are arranged, following the cautions in this report. Agree a date for the work with your installer.',
  },
  withdraw: {
    label: 'Take out of automatic use',
    short: 'Out of automatic use',
    explanation:
      'A critical hazard was found. Switch the operator off or to manual release until the critical fixes are done and checked.',
    owner:
      'Stop automatic operation now (switch the operator off or to manual release) and keep it off until the critical fixes below are done and checked.',
  },
};

export function verdictLabel(verdict: string | null | undefined): string {
  return verdict ? (VERDICT_WORDS[verdict as VerdictCode]?.label ?? humanise(verdict)) : 'Not scored yet';
}

/** Text and background classes with at least 4.5:1 contrast, for sunlight. */
export const VERDICT_CLASS: Record<VerdictCode, string> = {
  clear: 'bg-clear text-white',
  remedy: 'bg-remedy text-white',
  withdraw: 'bg-withdraw text-white',
};

export const SEVERITY_LABEL: Record<'critical' | 'major' | 'minor', string> = {
  critical: 'Critical',
  major: 'Major',
  minor: 'Minor',
};

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

// ---------------------------------------------------------------------------------------------
// Gates, sites and clients

export const GATE_KIND_LABEL: Record<string, string> = {
  swing: 'Swing',
  slide: 'Slide',
  barrier_arm: 'Barrier arm',
  vertical_lift: 'Vertical lift',
  vertical_pivot: 'Vertical pivot',
  overhead_pivot: 'Overhead pivot',
};

export function gateKindLabel(kind: string): string {
  return GATE_KIND_LABEL[kind] ?? humanise(kind);
}

const ROMAN = ['', 'I', 'II', 'III', 'IV'];

/** "usage class II". */
export function usageClassLabel(usageClass: number | null | undefined): string {
  return usageClass ? `usage class ${ROMAN[usageClass] ?? usageClass}` : 'usage class not set';
}

export const CLIENT_KIND_LABEL: Record<string, string> = {
  homeowner: 'Homeowner',
  property_manager: 'Property manager',
  business: 'Business',
};

export const ROLE_LABEL: Record<string, string> = {
  owner: 'Owner',
  office: 'Office',
  auditor: 'Auditor',
  homeowner: 'Homeowner or manager',
};

/** A ruleset as people name it: "North American automated vehicular gates 2026.1". */
export function rulesetLabel(ruleset: { title?: string | null; family: string; version: string }): string {
  return `${ruleset.title?.trim() || humanise(ruleset.family.replace(/-/g, ' '))} ${ruleset.version}`;
}

// ---------------------------------------------------------------------------------------------
// Mail and the audit trail

export const MAIL_KIND_LABEL: Record<string, string> = {
  sign_request: 'Link to sign',
  signed_report: 'Signed report to the client',
  signed_report_copy: 'Copy for the office',
};

export const AUDIT_ACTION_LABEL: Record<string, string> = {
  'assessment.created': 'Assessment started',
  'assessment.submitted': 'Assessment submitted and scored',
  'assessment.discarded': 'Draft discarded',
  'assessment.sent_for_signature': 'Sent for signature',
  'assessment.signed': 'Signed by the client',
  'assessment.revised': 'Revision started',
  'archive.exported': 'Archive exported',
  'invitation.created': 'Invitation sent',
  'invitation.accepted': 'Invitation accepted',
  'invitation.revoked': 'Invitation cancelled',
  'organisation.settings_changed': 'Settings changed',
  'reinspection.reminders_queued': 'Re-inspection reminders queued',
  'ruleset.amendment.derived': 'Ruleset amendment started',
  'ruleset.amendment.edited': 'Ruleset amendment edited',
  'ruleset.amendment.published': 'Ruleset amendment published',
  'ruleset.amendment.deleted': 'Ruleset amendment deleted',
  'sign_in.succeeded': 'Signed in',
  'sign_in.failed': 'Sign-in refused',
  'sign_in.throttled': 'Sign-in paused after too many tries',
  'sign_in.link_sent': 'Sign-in link sent',
  sign_out: 'Signed out',
};

export function auditActionLabel(action: string): string {
  return AUDIT_ACTION_LABEL[action] ?? humanise(action.replace(/\./g, ' '));
}

export const ENTITY_LABEL: Record<string, string> = {
  assessment: 'Assessment',
  user: 'Person',
  invitation: 'Invitation',
  organisation: 'Organisation',
  ruleset_version: 'Ruleset version',
  archive: 'Archive',
};

// ---------------------------------------------------------------------------------------------

/** Last resort for a code with no label yet: "needs_info" → "Needs info", never the raw code. */
export function humanise(code: string): string {
  const words = code.replace(/[_-]+/g, ' ').trim();
  return words.charAt(0).toUpperCase() + words.slice(1);
}
