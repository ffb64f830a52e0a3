/**
 * What a report shows, built from the assessment as stored: its stored scoring result (never
 * re-scored here), the organisation, site, gate, people, photos, force traces and, for the
 * final document, the signing record. Pure: loading is in src/lib/server/reports.ts.
 *
 * The stored result is read strictly (src/lib/rules/result-schema.ts): a malformed one is a
 * CorruptRecordError, never a default, so a critical finding can never print as minor.
 */
import type { CertificateFacts } from './certificate-facts';
import { cautionWithoutDisclaimer, VERDICT_WORDS, type EnteredMeasurement } from '@/lib/vocabulary';
import { StoredResultSchema, type StoredFinding, type StoredResult } from '@/lib/rules/result-schema';
import { ConflictError, CorruptRecordError } from '../errors';

export { StoredResultSchema, type StoredFinding, type StoredResult };

const SEVERITY_ORDER = ['critical', 'major', 'minor'] as const;
export type Severity = (typeof SEVERITY_ORDER)[number];
export type Verdict = 'clear' | 'remedy' | 'withdraw';

export type ReportKind = 'preview' | 'signing_copy' | 'signed_report';

export interface ReportPhoto {
  itemKey: string;
  caption: string | null;
  data: Buffer;
  format: 'jpg' | 'png';
  width: number;
  height: number;
  takenAt: Date | null;
}

export interface ReportForceTrace {
  label: string;
  itemKey: string;
  /** [t s, f N] */
  samples: Array<[number, number]>;
  /** The peak force allowed at this point, N, when the evaluation names it. */
  limitN: number | null;
  peakN: number | null;
  passed: boolean | null;
}

export interface SwingGeometryMeasurements {
  aMm: number;
  bMm: number;
  bracketFromHingeMm: number;
  retractedLengthMm: number;
  strokeMm: number;
  targetOpeningDeg: number;
  leafWidthMm: number | null;
}

export interface OwnerSignature {
  name: string;
  email: string;
  signedAt: Date;
  method: 'drawn' | 'typed';
  imagePng: Buffer | null;
  ip: string | null;
  userAgent: string | null;
  shownPdfSha256: string;
  consentText: string;
  intentText: string;
  cautionsAcknowledged: Array<{ ruleId: string; title: string }>;
}

export interface ReportSource {
  documentId: string;
  kind: ReportKind;
  generatedAt: Date;
  organisation: {
    id: string;
    name: string;
    timeZone: string;
    displayUnits: 'imperial' | 'metric';
  };
  assessment: {
    id: string;
    purpose: string;
    status: string;
    visitedOn: Date | null;
    submittedAt: Date | null;
    supersedesId: string | null;
    result: unknown;
    resultSha256: string | null;
    swingGeometry: SwingGeometryMeasurements | null;
    /** Each measurement as the auditor entered it (value and unit), by question key. */
    measurementsAsEntered?: Record<string, EnteredMeasurement>;
  };
  auditor: { name: string; email: string };
  client: { name: string; contactEmail: string | null };
  site: { name: string | null; lines: string[]; usageClass: number | null };
  gate: {
    label: string;
    kind: string;
    leaves: string;
    openingDirection: string | null;
    widthMm: number | null;
    heightMm: number | null;
    weightKg: number | null;
    /** Width and height as entered on the gate form, shown as entered ("12 ft × 6 ft"). */
    entered?: { width: EnteredMeasurement | null; height: EnteredMeasurement | null };
  };
  ruleset: {
    title: string;
    version: string;
    contentSha256: string;
    areaTitles: Record<string, string>;
  };
  photos: ReportPhoto[];
  forceTraces: ReportForceTrace[];
  signing: {
    assessor: { name: string; signedAt: Date };
    owner: OwnerSignature;
    /** The certificate whose key signs the final PDF, named in its record. */
    certificate?: CertificateFacts;
    /** Where anyone can check the signed file, e.g. https://reports.example/verify. */
    verifyUrl?: string;
    /** The audit trail's head when the report was signed: carried in the keywords and the signing record. */
    auditHead?: { eventId: number; hash: string } | null;
  } | null;
}

export interface ReportCaution {
  ruleId: string;
  title: string;
  severity: Severity;
  caution: string;
}

export interface ReportModel extends ReportSource {
  result: StoredResult;
  /** Failing findings, critical first, then needs-information, then the rest. */
  failing: Array<StoredFinding & { photos: ReportPhoto[] }>;
  needsInfo: StoredFinding[];
  passed: StoredFinding[];
  notApplicable: number;
  areas: Array<{ key: string; title: string; score: number | null }>;
  cautions: ReportCaution[];
  /** Photos no finding claimed, shown in their own section so none is left out. */
  otherPhotos: ReportPhoto[];
}

/** Nothing to report yet (a draft): a conflict with the assessment's state, not a fault. */
export class ReportNotReady extends ConflictError {}

const bySeverity = (a: StoredFinding, b: StoredFinding) =>
  SEVERITY_ORDER.indexOf(a.severity) - SEVERITY_ORDER.indexOf(b.severity) || a.ruleId.localeCompare(b.ruleId);

/** A photo belongs to a finding when its item key is the rule id or a fact the rule read. */
function photoBelongsTo(photo: ReportPhoto, finding: StoredFinding): boolean {
  if (photo.itemKey === finding.ruleId) return true;
  const keys = [...Object.keys(finding.observed), ...finding.missing.map((m) => m.key)].map((k) =>
    k.split('.').pop(),
  );
  return keys.includes(photo.itemKey);
}

/** The report says the disclaimer once; a caution keeps only its own words (see the vocabulary). */
export { cautionWithoutDisclaimer };

/**
 * The cautions the owner acknowledges: one per failing finding (worst first) with a caution
 * text, the same text once. The signing page and the report list exactly these.
 */
export function cautionsOf(result: StoredResult): ReportCaution[] {
  const cautions: ReportCaution[] = [];
  const seen = new Set<string>();
  for (const f of result.findings.filter((x) => x.outcome === 'fail').sort(bySeverity)) {
    const text = cautionWithoutDisclaimer(f.caution);
    if (!text || seen.has(text)) continue;
    seen.add(text);
    cautions.push({ ruleId: f.ruleId, title: f.title, severity: f.severity, caution: text });
  }
  return cautions;
}

export function buildReportModel(source: ReportSource): ReportModel {
  if (source.assessment.result === null || source.assessment.result === undefined)
    throw new ReportNotReady('This assessment has no stored scoring result to report on.');
  const parsed = StoredResultSchema.safeParse(source.assessment.result);
  if (!parsed.success) {
    const where = parsed.error.issues
      .slice(0, 5)
      .map((i) => `${i.path.join('.') || '(result)'}: ${i.message}`)
      .join('; ');
    throw new CorruptRecordError(
      'The stored result of this assessment is damaged; the report cannot be made.',
      `assessment ${source.assessment.id} result does not parse: ${where}`,
    );
  }
  const result = parsed.data;
  const claimed = new Set<ReportPhoto>();
  const failing = result.findings
    .filter((f) => f.outcome === 'fail')
    .sort(bySeverity)
    .map((f) => {
      const photos = source.photos.filter((p) => photoBelongsTo(p, f));
      photos.forEach((p) => claimed.add(p));
      return { ...f, caution: cautionWithoutDisclaimer(f.caution), photos };
    });
  const cautions = cautionsOf(result);
  const areaKeys = Object.keys(result.areaScores);
  return {
    ...source,
    result,
    failing,
    needsInfo: result.findings.filter((f) => f.outcome === 'needs_info').sort(bySeverity),
    passed: result.findings.filter((f) => f.outcome === 'pass').sort(bySeverity),
    notApplicable: result.findings.filter((f) => f.outcome === 'n/a').length,
    areas: areaKeys.map((key) => ({
      key,
      title: source.ruleset.areaTitles[key] ?? key,
      score: result.areaScores[key],
    })),
    cautions,
    otherPhotos: source.photos.filter((p) => !claimed.has(p)),
  };
}

/** The verdict in plain words, for the owner as much as the office (the vocabulary's words). */
export const verdictWords: Record<Verdict, { label: string; headline: string; meaning: string }> = {
  clear: {
    label: VERDICT_WORDS.clear.label,
    headline: VERDICT_WORDS.clear.headline,
    meaning: VERDICT_WORDS.clear.owner,
  },
  remedy: {
    label: VERDICT_WORDS.remedy.label,
    headline: VERDICT_WORDS.remedy.headline,
    meaning: VERDICT_WORDS.remedy.owner,
  },
  withdraw: {
    label: VERDICT_WORDS.withdraw.label,
    headline: VERDICT_WORDS.withdraw.headline,
    meaning: VERDICT_WORDS.withdraw.owner,
  },
};

export const DISCLAIMER =
  'This assessment supports, and does not replace, the gate and operator manufacturers\u2019 installation and maintenance instructions, the local codes in force, the decisions of the authority having jurisdiction, and the advice of licensed professionals. It records the condition seen on the day of the visit; a gate changes with use, weather and repairs.';
