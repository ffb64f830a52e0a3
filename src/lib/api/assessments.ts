/**
 * The assessment resource: a draft pinned to one published ruleset version, saved in pieces
 * by the walk-through with a row version (`If-Match`), then submitted for scoring.
 *
 * What the walk-through records is kept in three documents: `answers` (yes / no / na, choice,
 * date and text answers by question key), `measurements` (measured answers with the unit they
 * were entered in), and `observations` (site context, entrapment zones and devices, force tests,
 * swing-operator geometry, HRN overrides). PATCH merges into them as a JSON merge patch
 * (RFC 7396): a key set to null is removed, objects merge, arrays are replaced.
 */
import { z } from 'zod';
import {
  EntrapmentInputSchema,
  ForceTestSchema,
  HrnOverrideSchema,
  SiteContextSchema,
  SwingGeometryInputSchema,
  type MeasuredValue,
} from '@/lib/rules/input';
import { IdSchema, IsoDateSchema, boundedJson, pagingShape, sortSchema } from './common';
import { GATE_KIND_VALUES } from './gates';

export const ASSESSMENT_STATUSES = ['draft', 'scored', 'awaiting_signature', 'signed', 'superseded'] as const;
export type AssessmentStatus = (typeof ASSESSMENT_STATUSES)[number];
export const ASSESSMENT_PURPOSES = ['handover', 'service', 'inspection'] as const;
export type AssessmentPurpose = (typeof ASSESSMENT_PURPOSES)[number];
export const VERDICT_VALUES = ['clear', 'remedy', 'withdraw'] as const;
export type VerdictValue = (typeof VERDICT_VALUES)[number];

/** Limits on what one draft may hold, so a runaway client cannot fill the database. */
export const ASSESSMENT_LIMITS = { answers: 500, measurements: 500 } as const;

const enumOf = <const T extends readonly [string, ...string[]]>(values: T) =>
  z.enum(values, `must be one of: ${values.join(', ')}`);
const questionKey = z
  .string()
  .regex(/^[a-z][a-zA-Z0-9]{1,63}$/, 'must be a question key (camelCase letters and digits)');
const note = z
  .string()
  .trim()
  .max(2000, 'must be at most 2000 characters')
  .refine((s) => !s.includes('\u0000'), 'must not contain NUL characters');
const familySlug = z
  .string()
  .max(64, 'must be at most 64 characters')
  .regex(/^[a-z][a-z0-9]*(?:-[a-z0-9]+)*$/, 'must be a ruleset family slug such as "north-american-gate"');
const visitedOn = z.iso.datetime({ offset: true, message: 'must be a date and time (ISO 8601 with offset)' });

export const AssessmentCreateSchema = z.strictObject({
  gateId: IdSchema,
  family: familySlug,
  purpose: enumOf(ASSESSMENT_PURPOSES),
  /** When the visit took place; defaults to now. */
  visitedOn: visitedOn.optional(),
  /** Owner / office may start a draft for an auditor; an auditor's drafts are their own. */
  auditorId: IdSchema.optional(),
  /** Start from the gate's last signed visit: its answers, each to be confirmed or changed. */
  carryForward: z.boolean('must be true or false').optional(),
});

/** Carried-forward answers confirmed as they are: `answers.<key>` / `measurements.<key>`. */
export const CarriedForwardConfirmSchema = z.strictObject({
  keys: z
    .array(z.string().max(200, 'must be at most 200 characters'), 'must be a list of keys')
    .min(1, 'name at least one key')
    .max(500, 'at most 500 keys at once'),
});
export type AssessmentCreate = z.infer<typeof AssessmentCreateSchema>;

/** A yes / no / na, choice, date or text answer; checked against the pinned ruleset's question. */
export const AnswerEntrySchema = z.strictObject({
  value: z.string().trim().min(1, 'must not be empty').max(200, 'must be at most 200 characters'),
  note: note.optional(),
});
export type AnswerEntry = z.infer<typeof AnswerEntrySchema>;

/** A measurement as entered; the canonical value is computed when not sent (and checked when sent). */
export const MeasurementEntrySchema = z.strictObject({
  value: z.number('must be a number').refine(Number.isFinite, 'must be a finite number'),
  unit: z.string().min(1, 'must name a unit').max(8, 'must be at most 8 characters'),
  canonical: z.number('must be a number').refine(Number.isFinite, 'must be a finite number').optional(),
  note: note.optional(),
});
export type MeasurementEntry = z.infer<typeof MeasurementEntrySchema>;

/**
 * Observations as a draft may hold them: each part in the engine's own shape, the site context
 * possibly incomplete until submit.
 */
export const DraftObservationsSchema = z.strictObject({
  site: SiteContextSchema.partial().optional(),
  entrapment: EntrapmentInputSchema.optional(),
  forceTests: z.array(ForceTestSchema).max(50, 'must have at most 50 force tests').optional(),
  swingGeometry: SwingGeometryInputSchema.optional(),
  hrnOverrides: z.record(z.string().min(3).max(120), HrnOverrideSchema).optional(),
});
export type DraftObservations = z.infer<typeof DraftObservationsSchema>;

/** PATCH body: a merge patch of the three documents, plus the visit's facts. */
export const AssessmentPatchSchema = z
  .strictObject({
    answers: z.record(questionKey, AnswerEntrySchema.nullable()).optional(),
    measurements: z.record(questionKey, MeasurementEntrySchema.nullable()).optional(),
    /** Validated as a whole after merging (see DraftObservationsSchema). */
    observations: z
      .strictObject({
        site: boundedJson({ maxDepth: 2 }).optional(),
        entrapment: boundedJson({ maxDepth: 4 }).optional(),
        forceTests: boundedJson({ maxDepth: 5, maxItems: 20_000 }).optional(),
        swingGeometry: boundedJson({ maxDepth: 2 }).optional(),
        hrnOverrides: boundedJson({ maxDepth: 3 }).optional(),
      })
      .optional(),
    purpose: enumOf(ASSESSMENT_PURPOSES).optional(),
    visitedOn: visitedOn.optional(),
  })
  .refine((patch) => Object.keys(patch).length > 0, 'send at least one field to change');
export type AssessmentPatch = z.infer<typeof AssessmentPatchSchema>;

export const AssessmentListQuerySchema = z
  .strictObject({
    status: enumOf(ASSESSMENT_STATUSES).optional(),
    verdict: enumOf(VERDICT_VALUES).optional(),
    gateKind: enumOf(GATE_KIND_VALUES).optional(),
    auditorId: IdSchema.optional(),
    gateId: IdSchema.optional(),
    siteId: IdSchema.optional(),
    clientId: IdSchema.optional(),
    purpose: enumOf(ASSESSMENT_PURPOSES).optional(),
    /** Visit date range, inclusive, as dates in the organisation's time zone. */
    from: IsoDateSchema.optional(),
    to: IsoDateSchema.optional(),
    sort: sortSchema(['visitedOn', 'createdAt', 'updatedAt', 'submittedAt'], '-visitedOn'),
    ...pagingShape,
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'must not be before from' });
export type AssessmentListQuery = z.infer<typeof AssessmentListQuerySchema>;

export interface AssessmentSummary {
  id: string;
  status: AssessmentStatus;
  purpose: AssessmentPurpose;
  verdict: VerdictValue | null;
  rowVersion: number;
  gate: { id: string; label: string; kind: string };
  site: { id: string; name: string | null; addressLine1: string; city: string; usageClass: number };
  client: { id: string; name: string };
  auditor: { id: string; name: string };
  ruleset: { versionId: string; family: string; version: string; title: string };
  visitedOn: string | null;
  submittedAt: string | null;
  signedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface Assessment extends AssessmentSummary {
  answers: Record<string, AnswerEntry>;
  measurements: Record<string, MeasuredValue>;
  observations: DraftObservations;
  gateSnapshot: unknown;
  result: unknown;
  resultSha256: string | null;
}

/**
 * A save's answer when the client asks for the minimal one (`Prefer: return=minimal`): the new
 * row version (also the ETag) and the draft's documents as stored, which the walk-through keeps
 * as its base; not what the summary joins in (gate, site, client, auditor, ruleset).
 */
export type SavedDraft = Pick<
  Assessment,
  'id' | 'status' | 'rowVersion' | 'updatedAt' | 'answers' | 'measurements' | 'observations'
>;
