import type { APIRoute } from 'astro';
import { z } from 'zod';
import { idFromPath } from '@/lib/api/common';
import { assessmentReaders, assessmentWorkers } from '@/lib/server/domain-access';
import { found, requireRole } from '@/lib/server/http/guard';
import { readMultipart } from '@/lib/server/http/multipart';
import { uploadClientRef, replayedHeader } from '@/lib/server/http/idempotency';
import { handle, HttpProblem, parseValue } from '@/lib/server/http/problem';
import { addPhoto, listPhotos } from '@/lib/server/photos';
import { MAX_PHOTO_BYTES, tooLargeProblem } from '@/lib/server/photos/process';
import { CLIENT_REF_PATTERN, ITEM_KEY_PATTERN } from '@/lib/api/uploads';

const what = 'That assessment';

const PhotoFieldsSchema = z
  .strictObject({
    itemKey: z.string().regex(ITEM_KEY_PATTERN, 'must be the key of a walk-through item'),
    clientRef: z
      .string()
      .regex(CLIENT_REF_PATTERN, "must be the device's id for the photo (a UUID)")
      .optional(),
    takenAt: z.iso.datetime({ offset: true, message: 'must be a date and time (ISO 8601)' }).optional(),
    caption: z.string().trim().max(300, 'must be at most 300 characters').optional(),
    // The camera's file before the phone reduced it: all three travel together.
    sourceSha256: z
      .string()
      .regex(/^[0-9a-f]{64}$/, 'must be a SHA-256 in lowercase hex')
      .optional(),
    sourceBytes: z.coerce
      .number()
      .int('must be a whole number of bytes')
      .positive('must be more than 0')
      .max(2 ** 40, 'is too large')
      .optional(),
    orientation: z.coerce
      .number()
      .int()
      .min(1, 'must be an EXIF orientation, 1 to 8')
      .max(8, 'must be an EXIF orientation, 1 to 8')
      .optional(),
  })
  .refine((f) => (f.sourceSha256 === undefined) === (f.sourceBytes === undefined), {
    message: 'send sourceSha256 and sourceBytes together',
    path: ['sourceBytes'],
  });

/** The assessment's photos, oldest first, with their thumbnail and display URLs. */
export const GET: APIRoute = handle(async ({ locals, params }) => {
  const { user } = requireRole(locals, ...assessmentReaders);
  const id = found(idFromPath(params.id), what);
  return Response.json(await listPhotos(user, id));
});

/**
 * Uploads one photo (multipart: `photo` plus `itemKey`, optional `clientRef`, `takenAt`,
 * `caption`, and for a copy the phone reduced: `sourceSha256`, `sourceBytes`, `orientation`
 * of the camera's file). 201 when stored, 200 when the same `clientRef` was stored before
 * (marked `Idempotent-Replayed`). An `Idempotency-Key` header is taken as the `clientRef`.
 */
export const POST: APIRoute = handle(async ({ locals, params, request }) => {
  const { user } = requireRole(locals, ...assessmentWorkers);
  const id = found(idFromPath(params.id), what);
  const form = await readMultipart(request, MAX_PHOTO_BYTES, tooLargeProblem);
  const file = form.get('photo');
  if (!(file instanceof File))
    throw new HttpProblem(422, 'Attach the photo.', {
      errors: [{ field: 'photo', message: 'is required (a file)' }],
    });
  if (file.size > MAX_PHOTO_BYTES) throw tooLargeProblem(file.size);
  const fields = parseValue(
    PhotoFieldsSchema,
    Object.fromEntries(
      [...form.entries()].filter(([key, value]) => key !== 'photo' && typeof value === 'string'),
    ),
  );
  const { photo, created } = await addPhoto(user, id, {
    itemKey: fields.itemKey,
    clientRef: uploadClientRef(request, fields.clientRef, CLIENT_REF_PATTERN),
    caption: fields.caption || null,
    takenAt: fields.takenAt ? new Date(fields.takenAt) : null,
    fileName: file.name ? file.name.slice(0, 200) : null,
    bytes: Buffer.from(await file.arrayBuffer()),
    source:
      fields.sourceSha256 && fields.sourceBytes
        ? { sha256: fields.sourceSha256, bytes: fields.sourceBytes, orientation: fields.orientation ?? null }
        : null,
  });
  return Response.json(photo, {
    status: created ? 201 : 200,
    headers: { location: photo.displayUrl, ...(created ? {} : { [replayedHeader]: 'true' }) },
  });
});
