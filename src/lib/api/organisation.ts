/** The organisation's own settings, as the owner edits them. */
import { z } from 'zod';
import { text } from './common';

export const DISPLAY_UNITS = ['imperial', 'metric'] as const;

/** True for an IANA time zone name this runtime knows (e.g. America/Denver, UTC). */
export function isTimeZone(value: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: value });
    return true;
  } catch {
    return false;
  }
}

export const OrganisationPatchSchema = z
  .strictObject({
    name: text(200),
    displayUnits: z.enum(DISPLAY_UNITS, `must be one of: ${DISPLAY_UNITS.join(', ')}`),
    timeZone: z
      .string()
      .trim()
      .max(64, 'must be at most 64 characters')
      .refine(isTimeZone, 'must be a time zone name such as America/Denver'),
    reinspectionMonths: z
      .number('must be a number')
      .int('must be a whole number of months')
      .min(1, 'must be at least 1')
      .max(60, 'must be at most 60'),
    remindClients: z.boolean('must be true or false'),
  })
  .partial()
  .refine((patch) => Object.keys(patch).length > 0, 'send at least one field to change');
export type OrganisationPatch = z.infer<typeof OrganisationPatchSchema>;
