/**
 * The archive's query language, shared by the endpoints (parsing), the archive island (building
 * URLs) and the export: one filter schema, so a bookmarked view, the list, the count and the
 * ZIP export all mean the same rows.
 */
import { z } from 'zod';
import { ASSESSMENT_STATUSES, VERDICT_VALUES, type AssessmentStatus, type VerdictValue } from './assessments';
import { IdSchema, IsoDateSchema, SearchTextSchema } from './common';
import { GATE_KIND_VALUES } from './gates';
import { ARCHIVE_SORTS, type ArchiveFilterKey } from '../archive-query';

export { ARCHIVE_SORTS, ARCHIVE_FILTER_KEYS, type ArchiveSort } from '../archive-query';

const enumOf = <const T extends readonly [string, ...string[]]>(values: T) =>
  z.enum(values, `must be one of: ${values.join(', ')}`);
const familySlug = z
  .string()
  .max(64)
  .regex(/^[a-z][a-z0-9]*(?:-[a-z0-9]+)*$/, 'must be a ruleset family slug');
const versionLabel = z
  .string()
  .max(32)
  .regex(/^[0-9A-Za-z][0-9A-Za-z.+-]*$/, 'must be a version label such as 2026.1');
/** Empty query values (a cleared select in a form) mean "no filter". */
const blankAsUndefined = (value: unknown) => (value === '' ? undefined : value);
const optional = <S extends z.ZodType>(schema: S) => z.preprocess(blankAsUndefined, schema.optional());

/** The filters of the archive, as URL query parameters (also the export's); keys as ARCHIVE_FILTER_KEYS. */
export const ArchiveFilterShape = {
  /** Free text over client name, site address and gate label. */
  q: optional(SearchTextSchema),
  client: optional(SearchTextSchema),
  clientId: optional(IdSchema),
  address: optional(SearchTextSchema),
  gateKind: optional(enumOf(GATE_KIND_VALUES)),
  usageClass: optional(z.coerce.number().int().min(1, 'must be 1 to 4').max(4, 'must be 1 to 4')),
  status: optional(enumOf(ASSESSMENT_STATUSES)),
  verdict: optional(enumOf(VERDICT_VALUES)),
  family: optional(familySlug),
  version: optional(versionLabel),
  auditorId: optional(IdSchema),
  gateId: optional(IdSchema),
  /** Visit date range, inclusive, as days in the organisation's time zone. */
  from: optional(IsoDateSchema),
  to: optional(IsoDateSchema),
} satisfies Record<ArchiveFilterKey, z.ZodType>;
export const ARCHIVE_PAGE_SIZE_MAX = 100;

const dateOrder = (q: { from?: string; to?: string }) => !q.from || !q.to || q.from <= q.to;

export const ArchiveFilterSchema = z
  .strictObject(ArchiveFilterShape)
  .refine(dateOrder, { path: ['to'], message: 'must not be before from' });
export type ArchiveFilter = z.infer<typeof ArchiveFilterSchema>;

/** A page of the list: keyset pagination, `after` / `before` an opaque cursor from a previous page. */
export const ArchiveListQuerySchema = z
  .strictObject({
    ...ArchiveFilterShape,
    sort: z.preprocess(blankAsUndefined, enumOf(ARCHIVE_SORTS).default('-date')),
    limit: z.coerce
      .number()
      .int()
      .min(1, 'must be at least 1')
      .max(ARCHIVE_PAGE_SIZE_MAX, `must be at most ${ARCHIVE_PAGE_SIZE_MAX}`)
      .default(25),
    after: optional(z.string().max(400)),
    before: optional(z.string().max(400)),
  })
  .refine(dateOrder, { path: ['to'], message: 'must not be before from' })
  .refine((q) => !(q.after && q.before), { path: ['before'], message: 'send after or before, not both' });
export type ArchiveListQuery = z.infer<typeof ArchiveListQuerySchema>;

export interface ArchiveItem {
  id: string;
  status: AssessmentStatus;
  verdict: VerdictValue | null;
  /** The visit (or, for a draft without one, when it was started). */
  date: string;
  signedAt: string | null;
  client: { id: string; name: string };
  site: { id: string; addressLine1: string; city: string; postalCode: string | null; usageClass: number };
  gate: { id: string; label: string; kind: string };
  auditor: { id: string; name: string };
  ruleset: { family: string; version: string };
  /** The final signed PDF, when there is one. */
  signedDocumentId: string | null;
}

export interface ArchivePage {
  items: ArchiveItem[];
  /** Cursor for the next page in the current sort, or null at the end. */
  nextCursor: string | null;
  /** Cursor for the page before this one, or null at the start. */
  prevCursor: string | null;
}
