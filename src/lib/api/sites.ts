/** The site resource: a client's property where gates stand, with its UL 325 usage class. */
import { z } from 'zod';
import { IdSchema, optionalText, pagingShape, SearchTextSchema, sortSchema, text } from './common';

/** UL 325 vehicular usage class: I residential … IV restricted access (supervised). */
export const USAGE_CLASS_VALUES = [1, 2, 3, 4] as const;
export type SiteUsageClass = (typeof USAGE_CLASS_VALUES)[number];

const usageClass = z.union(
  USAGE_CLASS_VALUES.map((c) => z.literal(c)) as [
    z.ZodLiteral<1>,
    z.ZodLiteral<2>,
    z.ZodLiteral<3>,
    z.ZodLiteral<4>,
  ],
  'must be a usage class 1, 2, 3 or 4',
);
/** ISO 3166-1 alpha-2. */
const country = z
  .string()
  .trim()
  .regex(/^[A-Za-z]{2}$/, 'must be a two-letter country code')
  .transform((c) => c.toUpperCase());

const siteFields = {
  clientId: IdSchema,
  name: optionalText(200),
  addressLine1: text(200),
  addressLine2: optionalText(200),
  city: text(120),
  region: optionalText(120),
  postalCode: optionalText(20),
  country: country.optional(),
  usageClass,
  notes: optionalText(4000),
};

export const SiteCreateSchema = z.strictObject(siteFields);
export type SiteCreate = z.infer<typeof SiteCreateSchema>;

/** PATCH: any subset; moving a site to another client of the organisation is allowed. */
export const SitePatchSchema = z
  .strictObject(siteFields)
  .partial()
  .refine((patch) => Object.keys(patch).length > 0, 'send at least one field to change');
export type SitePatch = z.infer<typeof SitePatchSchema>;

export const SiteListQuerySchema = z.strictObject({
  q: SearchTextSchema.optional(),
  clientId: IdSchema.optional(),
  usageClass: z.coerce.number().pipe(usageClass).optional(),
  sort: sortSchema(['addressLine1', 'city', 'createdAt', 'updatedAt'], 'addressLine1'),
  ...pagingShape,
});
export type SiteListQuery = z.infer<typeof SiteListQuerySchema>;

export interface Site {
  id: string;
  clientId: string;
  clientName: string;
  name: string | null;
  addressLine1: string;
  addressLine2: string | null;
  city: string;
  region: string | null;
  postalCode: string | null;
  country: string;
  usageClass: SiteUsageClass;
  notes: string | null;
  createdAt: string;
  updatedAt: string;
}
