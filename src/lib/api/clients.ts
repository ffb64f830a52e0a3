/** The client resource as the API speaks it: who the contractor works for. */
import { z } from 'zod';
import { optionalText, pagingShape, SearchTextSchema, sortSchema, text } from './common';

export const CLIENT_KINDS = ['homeowner', 'property_manager', 'business'] as const;
export type ClientKind = (typeof CLIENT_KINDS)[number];

const kind = z.enum(CLIENT_KINDS, `must be one of: ${CLIENT_KINDS.join(', ')}`);
const contactEmail = z
  .string('must be text')
  .trim()
  .max(254, 'must be at most 254 characters')
  .refine((value) => value === '' || z.email().safeParse(value).success, 'must be an e-mail address')
  .transform((value) => value || null)
  .nullable()
  .optional();
/** Digits, spaces and the usual phone punctuation; long enough for an extension. */
const phone = z
  .string('must be text')
  .trim()
  .max(40, 'must be at most 40 characters')
  .regex(
    /^\+?[0-9 ().\-/]*(?:(?:x|ext\.?)\s*[0-9]+)?$/i,
    'must be a phone number (digits, spaces, + ( ) . - /)',
  )
  .transform((value) => value || null)
  .nullable()
  .optional();

export const ClientCreateSchema = z.strictObject({
  name: text(200),
  kind,
  contactEmail,
  phone,
  notes: optionalText(4000),
});
export type ClientCreate = z.infer<typeof ClientCreateSchema>;

/** PATCH: any subset of the fields; null clears an optional one. */
export const ClientPatchSchema = z
  .strictObject({ name: text(200), kind, contactEmail, phone, notes: optionalText(4000) })
  .partial()
  .refine((patch) => Object.keys(patch).length > 0, 'send at least one field to change');
export type ClientPatch = z.infer<typeof ClientPatchSchema>;

export const ClientListQuerySchema = z.strictObject({
  q: SearchTextSchema.optional(),
  kind: kind.optional(),
  sort: sortSchema(['name', 'createdAt', 'updatedAt'], 'name'),
  ...pagingShape,
});
export type ClientListQuery = z.infer<typeof ClientListQuerySchema>;

export interface Client {
  id: string;
  name: string;
  kind: ClientKind;
  contactEmail: string | null;
  phone: string | null;
  notes: string | null;
  createdAt: string;
  updatedAt: string;
}
