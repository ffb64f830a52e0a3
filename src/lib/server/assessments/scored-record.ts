/**
 * The scored record: what was judged at submit, frozen by the database in the same statement
 * that moved the assessment out of draft (db/migrations/20261204160000_scored_record.ts).
 * Reports, the signing copy, the signing page, the signed PDF and the assessment page read
 * this and nothing live. Read strictly: a record that does not parse is a CorruptRecordError,
 * never a default.
 */
import { z } from 'zod';
import { StoredResultSchema } from '@/lib/rules/result-schema';
import { CorruptRecordError } from '../errors';

const nullableText = z.string().nullable();

export const ScoredRecordSchema = z.object({
  format: z.literal(1),
  /** `submit` when frozen at submit; `backfill` for rows submitted before records existed. */
  source: z.enum(['submit', 'backfill']),
  frozenAt: z.string(),
  purpose: z.string(),
  visitedOn: nullableText,
  submittedAt: z.string(),
  organisation: z.object({ id: z.string(), name: z.string() }),
  auditor: z.object({ id: z.string(), name: z.string(), email: z.string() }),
  gate: z.object({
    id: z.string(),
    siteId: z.string(),
    clientId: z.string(),
    label: z.string(),
    kind: z.string(),
    leaves: z.string(),
    openingDirection: nullableText,
    widthMm: z.number().nullable(),
    heightMm: z.number().nullable(),
    weightKg: z.number().nullable(),
    entered: z.record(z.string(), z.unknown()),
    operator: z.record(z.string(), z.unknown()),
    installedOn: nullableText,
  }),
  site: z.object({
    id: z.string(),
    name: nullableText,
    addressLine1: z.string(),
    addressLine2: nullableText,
    city: z.string(),
    region: nullableText,
    postalCode: nullableText,
    country: z.string(),
    usageClass: z.number().int(),
  }),
  client: z.object({
    id: z.string(),
    name: z.string(),
    kind: z.string(),
    /** Where the signing link goes unless the office picks another address. */
    contactEmail: nullableText,
    phone: nullableText,
  }),
  ruleset: z.object({
    versionId: z.string(),
    family: z.string(),
    version: z.string(),
    title: z.string(),
    contentSha256: z.string(),
    areas: z.array(z.object({ key: z.string(), title: z.string() }).loose()),
  }),
  answers: z.record(z.string(), z.unknown()),
  measurements: z.record(z.string(), z.unknown()),
  observations: z.record(z.string(), z.unknown()),
  result: StoredResultSchema,
  resultSha256: z.string().regex(/^[0-9a-f]{64}$/),
});
export type ScoredRecord = z.infer<typeof ScoredRecordSchema>;

/** Parses a stored record; throws CorruptRecordError naming the first fields at fault. */
export function parseScoredRecord(assessmentId: string, raw: unknown): ScoredRecord {
  if (raw === null || raw === undefined)
    throw new CorruptRecordError(
      'This assessment has no frozen record to show.',
      `assessment ${assessmentId} is out of draft without a scored_record`,
    );
  const parsed = ScoredRecordSchema.safeParse(raw);
  if (!parsed.success) {
    const where = parsed.error.issues
      .slice(0, 5)
      .map((i) => `${i.path.join('.') || '(record)'}: ${i.message}`)
      .join('; ');
    throw new CorruptRecordError(
      'The stored record of this assessment is damaged; it cannot be shown.',
      `assessment ${assessmentId} scored_record does not parse: ${where}`,
    );
  }
  return parsed.data;
}

/** The site's address as printed: street lines, "city, region postcode", country. */
export function addressLines(site: ScoredRecord['site']): string[] {
  return [
    site.addressLine1,
    site.addressLine2,
    [site.city, [site.region, site.postalCode].filter(Boolean).join(' ')].filter(Boolean).join(', '),
    site.country,
  ].filter((l): l is string => Boolean(l));
}
