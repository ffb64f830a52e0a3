/**
 * Building blocks shared by the domain API's zod schemas: bounded text, ids, dates, and the
 * list query (page, page size, sort). Pure, so islands can validate a form with the same
 * rules the server applies.
 */
import { z } from 'zod';

/** PostgreSQL text cannot hold NUL; refuse it at the edge rather than fail in the database. */
const noNul = (value: string) => !value.includes('\u0000');

/** Required, trimmed, non-empty text of at most `max` characters. */
export const text = (max: number) =>
  z
    .string('must be text')
    .trim()
    .min(1, 'must not be empty')
    .max(max, `must be at most ${max} characters`)
    .refine(noNul, 'must not contain NUL characters');

/** Optional text that may also be cleared with null (or an empty string, stored as null). */
export const optionalText = (max: number) =>
  z
    .string('must be text')
    .trim()
    .max(max, `must be at most ${max} characters`)
    .refine(noNul, 'must not contain NUL characters')
    .transform((value) => value || null)
    .nullable()
    .optional();

export const IdSchema = z.uuid('must be an id (UUID)');

export const IsoDateSchema = z.iso.date('must be a date written YYYY-MM-DD');

/** An id taken from a URL: anything that is not a UUID simply names no record (404). */
export function idFromPath(value: string | undefined): string | null {
  const parsed = IdSchema.safeParse(value);
  return parsed.success ? parsed.data : null;
}

export const PAGE_SIZE_DEFAULT = 25;
export const PAGE_SIZE_MAX = 100;

/** Free-text search as typed in a list's search box. */
export const SearchTextSchema = z
  .string()
  .trim()
  .max(200, 'must be at most 200 characters')
  .refine(noNul, 'must not contain NUL characters');

export const pagingShape = {
  page: z.coerce
    .number('must be a whole number')
    .int('must be a whole number')
    .min(1, 'must be at least 1')
    .max(100_000)
    .default(1),
  pageSize: z.coerce
    .number('must be a whole number')
    .int('must be a whole number')
    .min(1, 'must be at least 1')
    .max(PAGE_SIZE_MAX, `must be at most ${PAGE_SIZE_MAX}`)
    .default(PAGE_SIZE_DEFAULT),
};

/**
 * `?sort=name` or `?sort=-name` over the listed fields; every list also orders by id last, so
 * pages are stable even when many rows share the sorted value.
 */
export function sortSchema<const F extends readonly [string, ...string[]]>(
  fields: F,
  fallback: F[number] | `-${F[number]}`,
) {
  const values = [...fields, ...fields.map((f) => `-${f}`)] as [string, ...string[]];
  return z
    .enum(values, `must be one of: ${values.join(', ')}`)
    .default(fallback)
    .transform((value) => {
      const descending = value.startsWith('-');
      return {
        field: (descending ? value.slice(1) : value) as F[number],
        direction: descending ? ('desc' as const) : ('asc' as const),
      };
    });
}

export interface Page<T> {
  items: T[];
  page: number;
  pageSize: number;
  total: number;
}

/** Limits for free-form JSON kept in jsonb columns (observations, answer notes). */
export interface JsonLimits {
  maxDepth: number;
  maxText: number;
  maxItems: number;
}

const defaultJsonLimits: JsonLimits = { maxDepth: 6, maxText: 4000, maxItems: 500 };

/**
 * A JSON value as jsonb can store it: finite numbers, bounded depth, lengths and sizes, no
 * NUL in keys or text. Each problem is reported at its own path, e.g. `observations.site.note`.
 */
export function boundedJson(limits: Partial<JsonLimits> = {}) {
  const { maxDepth, maxText, maxItems } = { ...defaultJsonLimits, ...limits };
  return z.unknown().superRefine((root, ctx) => {
    const visit = (value: unknown, path: PropertyKey[], depth: number): void => {
      if (value === null || typeof value === 'boolean') return;
      if (typeof value === 'number') {
        if (!Number.isFinite(value))
          ctx.addIssue({ code: 'custom', path, message: 'must be a finite number' });
        return;
      }
      if (typeof value === 'string') {
        if (value.length > maxText)
          ctx.addIssue({ code: 'custom', path, message: `must be at most ${maxText} characters` });
        else if (!noNul(value))
          ctx.addIssue({ code: 'custom', path, message: 'must not contain NUL characters' });
        return;
      }
      if (typeof value !== 'object') {
        ctx.addIssue({ code: 'custom', path, message: 'must be a JSON value' });
        return;
      }
      if (depth >= maxDepth) {
        ctx.addIssue({ code: 'custom', path, message: `must be nested at most ${maxDepth} levels deep` });
        return;
      }
      const entries: [PropertyKey, unknown][] = Array.isArray(value)
        ? value.map((v, i) => [i, v])
        : Object.entries(value);
      if (entries.length > maxItems) {
        ctx.addIssue({ code: 'custom', path, message: `must have at most ${maxItems} entries` });
        return;
      }
      for (const [key, member] of entries) {
        if (typeof key === 'string' && !jsonKey.safeParse(key).success) {
          ctx.addIssue({
            code: 'custom',
            path: [...path, key],
            message: 'keys must be 1 to 100 characters without NUL',
          });
          continue;
        }
        visit(member, [...path, key], depth + 1);
      }
    };
    visit(root, [], 0);
  });
}

/** Keys inside stored JSON documents: short, printable, no NUL. */
export const jsonKey = z
  .string()
  .min(1, 'keys must not be empty')
  .max(100, 'keys must be at most 100 characters')
  .refine(noNul, 'must not contain NUL characters');
