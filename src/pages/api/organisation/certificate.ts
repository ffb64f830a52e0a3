/**
 * The certificate that signs the organisation's reports.
 * GET (owner, office): the one in use (fingerprint, subject, issuer, validity, uploaded or
 * self-made) and an upload that cannot be used, with why.
 * PUT (owner): multipart/form-data with `certificate` (a PKCS#12 .p12/.pfx, at most 64 KB)
 * and `passphrase`; checked, stored (see signing-certificates.ts), audited. 422 names the
 * field at fault: not PKCS#12, wrong passphrase, no key, expired, wrong key usage, too large.
 * DELETE (owner): back to the self-made certificate.
 */
import type { APIRoute } from 'astro';
import { actorOf } from '@/lib/server/http/actor';
import { requireRole } from '@/lib/server/http/guard';
import { readMultipart } from '@/lib/server/http/multipart';
import { handle, HttpProblem } from '@/lib/server/http/problem';
import {
  certificateOverview,
  MAX_CERTIFICATE_BYTES,
  removeSigningCertificate,
  uploadSigningCertificate,
} from '@/lib/server/signing-certificates';

/** The form is read up to this size; a certificate over MAX_CERTIFICATE_BYTES inside it gets a 422 naming the field. */
const MAX_FORM_BYTES = 1024 * 1024;

export const GET: APIRoute = handle(async ({ locals }) => {
  const { organisation } = requireRole(locals, 'owner', 'office');
  return Response.json(await certificateOverview(organisation));
});

export const PUT: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  const form = await readMultipart(
    context.request,
    MAX_FORM_BYTES,
    () => new HttpProblem(413, `A certificate file is at most ${MAX_CERTIFICATE_BYTES / 1024} KB.`),
  );
  const file = form.get('certificate');
  const passphrase = form.get('passphrase');
  const errors = [
    ...(file instanceof File ? [] : [{ field: 'certificate', message: 'choose the .p12 or .pfx file' }]),
    ...(typeof passphrase === 'string'
      ? []
      : [{ field: 'passphrase', message: "enter the certificate file's passphrase" }]),
  ];
  if (errors.length) throw new HttpProblem(422, 'The certificate cannot be used.', { errors });
  const bytes = Buffer.from(await (file as File).arrayBuffer());
  await uploadSigningCertificate(organisation.id, bytes, passphrase as string, actorOf(user, context));
  return Response.json(await certificateOverview(organisation));
});

export const DELETE: APIRoute = handle(async (context) => {
  const { user, organisation } = requireRole(context.locals, 'owner');
  await removeSigningCertificate(organisation.id, actorOf(user, context));
  return new Response(null, { status: 204 });
});
