/**
 * Loads everything a report shows for one assessment (organisation-scoped) and renders it:
 * the stored result, the people, site and gate, the ruleset's identity and area titles, the
 * photos (display size, from file storage), force traces and swing geometry as recorded, and
 * for the final document the signing record. Nothing is re-scored here.
 */
import type { EnteredMeasurement } from '@/lib/measure-display';
import type { Knex } from 'knex';
import { db } from './db';
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

interface AssessmentRow {
  id: string;
  organisation_id: string;
  auditor_id: string;
  status: string;
  purpose: string;
  visited_on: Date | null;
  submitted_at: Date | null;
  supersedes_id: string | null;
  result: unknown;
  result_sha256: string | null;
  observations: Record<string, unknown> | null;
  measurements: Record<string, unknown> | null;
  gate_entered: Record<string, unknown> | null;
  org_name: string;
  org_time_zone: string;
  org_display_units: 'imperial' | 'metric';
  auditor_name: string;
  auditor_email: string;
  client_name: string;
  client_contact_email: string | null;
  site_name: string | null;
  address_line1: string;
  address_line2: string | null;
  city: string;
  region: string | null;
  postal_code: string | null;
  country: string;
  usage_class: number | null;
  gate_label: string;
  gate_kind: string;
  leaves: string;
  opening_direction: string | null;
  width_mm: number | null;
  height_mm: number | null;
  weight_kg: number | null;
  ruleset_title: string;
  ruleset_version: string;
  ruleset_content_sha256: string;
  ruleset_areas: unknown;
}

/** The assessment with its people, site, gate and ruleset, or null when not in the organisation. */
export async function loadAssessmentForReport(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
): Promise<AssessmentRow | null> {
  const row = await knex('assessments as a')
    .join('organisations as o', 'o.id', 'a.organisation_id')
    .join('users as u', 'u.id', 'a.auditor_id')
    .join('gates as g', 'g.id', 'a.gate_id')
    .join('sites as s', 's.id', 'g.site_id')
    .join('clients as c', 'c.id', 's.client_id')
    .join('ruleset_versions as rv', 'rv.id', 'a.ruleset_version_id')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where('a.organisation_id', organisationId)
    .andWhere('a.id', assessmentId)
    .first<AssessmentRow | undefined>(
      'a.id',
      'a.organisation_id',
      'a.auditor_id',
      'a.status',
      'a.purpose',
      'a.visited_on',
      'a.submitted_at',
      'a.supersedes_id',
      'a.result',
      'a.result_sha256',
      'a.observations',
      'a.measurements',
      'o.name as org_name',
      'o.time_zone as org_time_zone',
      'o.display_units as org_display_units',
      'u.name as auditor_name',
      'u.email as auditor_email',
      'c.name as client_name',
      'c.contact_email as client_contact_email',
      's.name as site_name',
      's.address_line1',
      's.address_line2',
      's.city',
      's.region',
      's.postal_code',
      's.country',
      's.usage_class',
      'g.label as gate_label',
      'g.kind as gate_kind',
      'g.leaves',
      'g.opening_direction',
      'g.width_mm',
      'g.height_mm',
      'g.weight_kg',
      'g.entered as gate_entered',
      'r.title as ruleset_title',
      'rv.version as ruleset_version',
      'rv.content_sha256 as ruleset_content_sha256',
      knex.raw(`rv.content -> 'areas' as ruleset_areas`),
    );
  return row ?? null;
}

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
  row: AssessmentRow,
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
  const leafWidthMm = row.width_mm ? (row.leaves === 'double' ? row.width_mm / 2 : row.width_mm) : null;
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

async function forceTracesOf(knex: Knex, row: AssessmentRow): Promise<ReportForceTrace[]> {
  const rows = await knex('force_traces')
    .where({ assessment_id: row.id })
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
  const tests = Array.isArray(row.observations?.forceTests)
    ? (row.observations.forceTests as Array<Record<string, unknown>>)
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

/** Everything the report of `assessmentId` shows, ready for the renderer. */
export async function loadReportSource(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
  options: { kind: ReportKind; documentId: string; signing?: ReportSigning | null },
): Promise<ReportSource | null> {
  const row = await loadAssessmentForReport(knex, organisationId, assessmentId);
  if (!row) return null;
  if (!row.result) throw new ReportNotReady('This assessment has not been scored yet; submit it first.');
  const [photos, forceTraces] = await Promise.all([photosOf(knex, row.id), forceTracesOf(knex, row)]);
  return {
    documentId: options.documentId,
    kind: options.kind,
    generatedAt: new Date(),
    organisation: {
      id: row.organisation_id,
      name: row.org_name,
      timeZone: row.org_time_zone,
      displayUnits: row.org_display_units,
    },
    assessment: {
      id: row.id,
      purpose: row.purpose,
      status: row.status,
      visitedOn: row.visited_on,
      submittedAt: row.submitted_at,
      supersedesId: row.supersedes_id,
      result: row.result,
      resultSha256: row.result_sha256,
      swingGeometry: swingGeometryOf(row.observations, row),
      measurementsAsEntered: enteredMeasurements(row.measurements),
    },
    auditor: { name: row.auditor_name, email: row.auditor_email },
    client: { name: row.client_name, contactEmail: row.client_contact_email },
    site: {
      name: row.site_name,
      lines: [
        row.address_line1,
        row.address_line2,
        [row.city, [row.region, row.postal_code].filter(Boolean).join(' ')].filter(Boolean).join(', '),
        row.country,
      ].filter((l): l is string => Boolean(l)),
      usageClass: row.usage_class,
    },
    gate: {
      label: row.gate_label,
      kind: row.gate_kind,
      leaves: row.leaves,
      openingDirection: row.opening_direction,
      widthMm: row.width_mm,
      heightMm: row.height_mm,
      weightKg: row.weight_kg,
      entered: {
        width: enteredMeasurement(row.gate_entered?.width),
        height: enteredMeasurement(row.gate_entered?.height),
      },
    },
    ruleset: {
      title: row.ruleset_title,
      version: row.ruleset_version,
      contentSha256: row.ruleset_content_sha256,
      areaTitles: areaTitles(row.ruleset_areas),
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
