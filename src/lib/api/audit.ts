/**
 * The audit trail's search and filters, shared by `GET /api/archive/audit` and the page: free
 * text, an event kind, a person, a date range (days in the organisation's time zone, both ends
 * inclusive) and one assessment or gate. Bad values are refused per field, never ignored.
 */
import { z } from 'zod';

const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date written YYYY-MM-DD')
  .refine(
    (value) =>
      !Number.isNaN(Date.parse(`${value}T00:00:00Z`)) &&
      new Date(`${value}T00:00:00Z`).toISOString().startsWith(value),
    'is not a calendar date',
  );
const uuid = z.uuid('must be an id (UUID)');
/** Blank form fields mean "no filter". */
const blankAsMissing = (value: unknown) => (value === '' ? undefined : value);

export const AuditFilterSchema = z
  .strictObject({
    before: z.coerce
      .number('must be a number')
      .int('must be a whole number')
      .min(1, 'must be at least 1')
      .optional(),
    limit: z.coerce
      .number('must be a number')
      .int('must be a whole number')
      .min(1, 'must be at least 1')
      .max(200, 'must be at most 200')
      .default(50),
    q: z.preprocess(blankAsMissing, z.string().trim().max(100, 'must be at most 100 characters').optional()),
    action: z.preprocess(
      blankAsMissing,
      z
        .string()
        .max(100, 'must be at most 100 characters')
        .regex(/^[a-z_]+(\.[a-z_]+)*$/, 'must be an event kind such as assessment.signed')
        .optional(),
    ),
    actor: z.preprocess(blankAsMissing, uuid.optional()),
    from: z.preprocess(blankAsMissing, day.optional()),
    to: z.preprocess(blankAsMissing, day.optional()),
    /** Events of one record (an assessment, a gate, a site …). */
    entityId: z.preprocess(blankAsMissing, uuid.optional()),
    /** Events of a gate and of every assessment of it. */
    gateId: z.preprocess(blankAsMissing, uuid.optional()),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, { path: ['to'], message: 'must not be before "from"' });
export type AuditFilter = z.infer<typeof AuditFilterSchema>;

/** Whether any filter (beyond paging) is set: the page opens its filter panel then. */
export function hasAuditFilter(filter: Partial<AuditFilter>): boolean {
  return Boolean(
    filter.q || filter.action || filter.actor || filter.from || filter.to || filter.entityId || filter.gateId,
  );
}
