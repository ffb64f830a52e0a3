/**
 * Loads everything a report shows for one assessment (organisation-scoped) and renders it:
 * the frozen record made at submit (result, people, site, gate, client, ruleset identity and
 * area titles, observations), the photos (display size, from file storage) and force traces
 * kept with the assessment, and for the final document the signing record. Nothing is
 * re-scored and nothing is read from the live gate, site or client rows: a later edit of those
 * belongs to the next assessment.
 */
import type { EnteredMeasurement } from '@/lib/vocabulary';
import type { Knex } from 'knex';
import { db } from './db';
import { loadFrozenAssessment, type ScoredRecord } from './assessments';
import { addressLines } from './assessments/scored-record';
import {
  buildReportModel,
  ReportNotReady,
  type OwnerSignature,
  type ReportForceTrace,
  type ReportKind,
  type ReportPhoto,
  type ReportSource,
  type SwingGeometryMeasurements,
} from './pdf/report-model';
import { renderReportPdf } from './pdf/render';
import { storage } from './storage';
import type { CertificateFacts } from './pdf/certificate-facts';

export { ReportNotReady };

function areaTitles(areas: unknown): Record<string, string> {
  const titles: Record<string, string> = {};
  if (Array.isArray(areas))
    for (const a of areas)
      if (a && typeof a.key === 'string' && typeof a.title === 'string') titles[a.key] = a.title;
  return titles;
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** A value as entered ({ value, unit }) from stored JSON, or null when it is not one. */
function enteredMeasurement(raw: unknown): EnteredMeasurement | null {
  if (!raw || typeof raw !== 'object') return null;
  const { value, unit, canonical } = raw as Record<string, unknown>;
  if (typeof value !== 'number' || !Number.isFinite(value) || typeof unit !== 'string') return null;
  return { value, unit, ...(typeof canonical === 'number' ? { canonical } : {}) };
}

/** The walk-through's measurements as entered, by question key. */
export function enteredMeasurements(raw: Record<string, unknown> | null): Record<string, EnteredMeasurement> {
  const out: Record<string, EnteredMeasurement> = {};
  for (const [key, value] of Object.entries(raw ?? {})) {
    const measured = enteredMeasurement(value);
    if (measured) out[key] = measured;
  }
  return out;
}

function swingGeometryOf(
  observations: Record<string, unknown> | null,
  gate: ScoredRecord['gate'],
): SwingGeometryMeasurements | null {
  const g = observations?.swingGeometry as Record<string, unknown> | undefined;
  if (!g) return null;
  const fields = [
    'aMm',
    'bMm',
    'bracketFromHingeMm',
    'retractedLengthMm',
    'strokeMm',
    'targetOpeningDeg',
  ] as const;
  const values = fields.map((f) => num(g[f]));
  if (values.some((v) => v === null)) return null;
  const [aMm, bMm, bracketFromHingeMm, retractedLengthMm, strokeMm, targetOpeningDeg] = values as number[];
  const leafWidthMm = gate.widthMm ? (gate.leaves === 'double' ? gate.widthMm / 2 : gate.widthMm) : null;
  return { aMm, bMm, bracketFromHingeMm, retractedLengthMm, strokeMm, targetOpeningDeg, leafWidthMm };
}

/** Samples as stored by either the trace upload ([t, f] pairs) or a force test ({ t, f }). */
function samplesOf(raw: unknown): Array<[number, number]> {
  if (!Array.isArray(raw)) return [];
  const out: Array<[number, number]> = [];
  for (const s of raw) {
    const t = Array.isArray(s) ? num(s[0]) : num((s as { t?: unknown })?.t);
    const f = Array.isArray(s) ? num(s[1]) : num((s as { f?: unknown })?.f);
    if (t !== null && f !== null) out.push([t, f]);
  }
  return out;
}

async function forceTracesOf(
  knex: Knex,
  assessmentId: string,
  observations: Record<string, unknown>,
): Promise<ReportForceTrace[]> {
  const rows = await knex('force_traces')
    .where({ assessment_id: assessmentId })
    .orderBy('created_at')
    .select('item_key', 'label', 'samples', 'evaluation');
  const traces: ReportForceTrace[] = rows.map((t) => {
    const e = (t.evaluation ?? {}) as { peak?: unknown; limits?: { peakN?: unknown }; overallPass?: unknown };
    return {
      label: t.label ?? t.item_key,
      itemKey: t.item_key,
      samples: samplesOf(t.samples),
      limitN: num(e.limits?.peakN),
      peakN: num(e.peak),
      passed: typeof e.overallPass === 'boolean' ? e.overallPass : null,
    };
  });
  if (traces.length) return traces.filter((t) => t.samples.length >= 2);
  // No uploaded traces: plot the raw samples of force tests recorded in the observations.
  const tests = Array.isArray(observations.forceTests)
    ? (observations.forceTests as Array<Record<string, unknown>>)
    : [];
  return tests
    .map((test, i) => ({
      label: `${String(test.location ?? 'point').replace(/_/g, ' ')}, ${String(test.direction ?? '')}, gap ${num(test.gapMm) ?? '?'} mm`,
      itemKey: `forceTest${i + 1}`,
      samples: samplesOf(test.samples),
      limitN: null,
      peakN: null,
      passed: null,
    }))
    .filter((t) => t.samples.length >= 2);
}

async function photosOf(knex: Knex, assessmentId: string): Promise<ReportPhoto[]> {
  const rows = await knex('assessment_photos')
    .where({ assessment_id: assessmentId })
    .orderBy([{ column: 'item_key' }, { column: 'created_at' }])
    .select('item_key', 'caption', 'display_sha256', 'display_content_type', 'width', 'height', 'taken_at');
  const photos = await Promise.all(
    rows.map(async (p): Promise<ReportPhoto | null> => {
      const format =
        p.display_content_type === 'image/png'
          ? 'png'
          : p.display_content_type === 'image/jpeg'
            ? 'jpg'
            : null;
      if (!format) return null;
      const data = await storage().get(p.display_sha256);
      if (!data) return null;
      return {
        itemKey: p.item_key,
        caption: p.caption,
        data,
        format,
        width: p.width,
        height: p.height,
        takenAt: p.taken_at,
      };
    }),
  );
  return photos.filter((p): p is ReportPhoto => p !== null);
}

export interface ReportSigning {
  assessor: { name: string; signedAt: Date };
  owner: OwnerSignature;
  certificate?: CertificateFacts;
  verifyUrl?: string;
  /** The audit trail's head when the report was signed (audit-anchors.ts). */
  auditHead?: { eventId: number; hash: string } | null;
}

/**
 * Everything the report of `assessmentId` shows, ready for the renderer; null when it is not in
 * the organisation. A draft has nothing to report (ReportNotReady); a damaged record throws
 * CorruptRecordError.
 */
export async function loadReportSource(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
  options: { kind: ReportKind; documentId: string; signing?: ReportSigning | null },
): Promise<ReportSource | null> {
  const frozen = await loadFrozenAssessment(knex, organisationId, assessmentId);
  if (!frozen) return null;
  if (!frozen.record) throw new ReportNotReady('This assessment has not been scored yet; submit it first.');
  const { record } = frozen;
  const [photos, forceTraces] = await Promise.all([
    photosOf(knex, frozen.id),
    forceTracesOf(knex, frozen.id, record.observations),
  ]);
  return {
    documentId: options.documentId,
    kind: options.kind,
    generatedAt: new Date(),
    organisation: {
      id: record.organisation.id,
      name: record.organisation.name,
      timeZone: frozen.timeZone,
      displayUnits: frozen.displayUnits,
    },
    assessment: {
      id: frozen.id,
      purpose: record.purpose,
      status: frozen.status,
      visitedOn: record.visitedOn ? new Date(record.visitedOn) : null,
      submittedAt: new Date(record.submittedAt),
      supersedesId: frozen.supersedesId,
      result: record.result,
      resultSha256: record.resultSha256,
      swingGeometry: swingGeometryOf(record.observations, record.gate),
      measurementsAsEntered: enteredMeasurements(record.measurements),
    },
    auditor: { name: record.auditor.name, email: record.auditor.email },
    client: { name: record.client.name, contactEmail: record.client.contactEmail },
    site: { name: record.site.name, lines: addressLines(record.site), usageClass: record.site.usageClass },
    gate: {
      label: record.gate.label,
      kind: record.gate.kind,
      leaves: record.gate.leaves,
      openingDirection: record.gate.openingDirection,
      widthMm: record.gate.widthMm,
      heightMm: record.gate.heightMm,
      weightKg: record.gate.weightKg,
      entered: {
        width: enteredMeasurement(record.gate.entered?.width),
        height: enteredMeasurement(record.gate.entered?.height),
      },
    },
    ruleset: {
      title: record.ruleset.title,
      version: record.ruleset.version,
      contentSha256: record.ruleset.contentSha256,
      areaTitles: areaTitles(record.ruleset.areas),
    },
    photos,
    forceTraces,
    signing: options.signing ?? null,
  };
}

/** Renders the report of an assessment; null when it is not in the organisation. */
export async function renderAssessmentReport(
  organisationId: string,
  assessmentId: string,
  options: { kind: ReportKind; documentId: string; signing?: ReportSigning | null },
  knex: Knex = db(),
): Promise<Buffer | null> {
  const source = await loadReportSource(knex, organisationId, assessmentId, options);
  if (!source) return null;
  return renderReportPdf(buildReportModel(source));
}
