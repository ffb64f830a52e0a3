/**
 * What the signing flow accepts: the send body, the signer's submit (consent, intent, name,
 * acknowledged cautions, the shown PDF's hash, a drawn PNG or the typed mark), and the exact
 * consent and intent sentences stored with each signature.
 */
import { z } from 'zod';

export const SIGN_LINK_DEFAULT_DAYS = 14;
export const SIGN_LINK_MAX_DAYS = 60;

/** Shown beside the consent checkbox and stored with the signature, word for word. */
export const CONSENT_TEXT =
  'I agree to sign this acknowledgement electronically. My typed name and the mark I make here count as my handwritten signature.';

/** Shown beside the sign button and stored with the signature, word for word. */
export const INTENT_TEXT =
  'By signing, I confirm that I received and read this gate safety report and each caution I ticked. Signing does not say that any repair has been done.';

/** A drawn signature is a small PNG; anything bigger is not from the signature pad. */
export const MAX_SIGNATURE_PNG_BYTES = 400 * 1024;
export const SIGNATURE_BODY_LIMIT = 700 * 1024;

export const SendForSignatureSchema = z.strictObject({
  expiresInDays: z
    .number()
    .int('must be a whole number of days')
    .min(1, 'must be at least 1 day')
    .max(SIGN_LINK_MAX_DAYS, `must be at most ${SIGN_LINK_MAX_DAYS} days`)
    .optional(),
  /**
   * Who receives the signing link: one of the client's contacts or an address the office types.
   * Absent: the client's contact e-mail.
   */
  recipient: z
    .string('must be text')
    .trim()
    .max(254, 'must be at most 254 characters')
    .pipe(z.email('must be an e-mail address'))
    .optional(),
});

const pngDataUrl = z
  .string()
  .max(SIGNATURE_BODY_LIMIT)
  .regex(/^data:image\/png;base64,[A-Za-z0-9+/]+={0,2}$/, 'must be a PNG data URL');

export const SignatureSubmitSchema = z.strictObject({
  name: z
    .string()
    .trim()
    .min(2, 'type your full name')
    .max(120, 'must be at most 120 characters')
    .refine((v) => !/[\u0000-\u001f]/.test(v), 'must not contain control characters'),
  consent: z.literal(true, 'tick the box to agree to sign electronically'),
  intent: z.literal(true, 'confirm that you mean to sign'),
  acknowledgedCautions: z.array(z.string().max(200)).max(500),
  shownPdfSha256: z.string().regex(/^[0-9a-f]{64}$/, 'must be the SHA-256 of the report shown'),
  signature: z.discriminatedUnion('method', [
    z.strictObject({ method: z.literal('drawn'), png: pngDataUrl }),
    z.strictObject({ method: z.literal('typed') }),
  ]),
});
export type SignatureSubmit = z.infer<typeof SignatureSubmitSchema>;
