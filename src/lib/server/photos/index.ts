/**
 * Photos of an assessment: the files go to storage under their SHA-256 (original, display
 * size, thumbnail), the metadata to `assessment_photos`. A photo the device sends twice (a
 * retry after a dropped connection) is stored once, found again by the device's own id.
 */
import type { Knex } from 'knex';
import type { PhotoRecord } from '@/lib/api/uploads';
import { assertEditable, getAssessment } from '../assessments';
import { db } from '../db';
import { NotFoundError } from '../errors';
import { iso, pgErrorCode } from '../listing';
import type { SessionUser } from '../session-user';
import { storage } from '../storage';
import { processPhoto } from './process';

const UNIQUE_VIOLATION = '23505';

interface PhotoRow {
  id: string;
  assessment_id: string;
  client_ref: string | null;
  item_key: string;
  caption: string | null;
  width: number;
  height: number;
  display_bytes: number;
  original_bytes: number;
  original_sha256: string;
  original_content_type: string;
  display_sha256: string;
  thumb_sha256: string | null;
  source_sha256: string | null;
  source_bytes: string | number | null;
  taken_at: Date | null;
  created_at: Date;
}

const columns = [
  'id',
  'assessment_id',
  'client_ref',
  'item_key',
  'caption',
  'width',
  'height',
  'display_bytes',
  'original_bytes',
  'original_sha256',
  'original_content_type',
  'display_sha256',
  'thumb_sha256',
  'source_sha256',
  'source_bytes',
  'taken_at',
  'created_at',
];

function toRecord(row: PhotoRow): PhotoRecord {
  const base = `/api/assessments/${row.assessment_id}/photos/${row.id}`;
  return {
    id: row.id,
    clientRef: row.client_ref,
    itemKey: row.item_key,
    caption: row.caption,
    width: row.width,
    height: row.height,
    displayBytes: row.display_bytes,
    originalBytes: row.original_bytes,
    // Rows from before the phone reduced photos hold the camera's own file.
    sourceSha256: row.source_sha256 ?? row.original_sha256,
    sourceBytes: row.source_bytes === null ? row.original_bytes : Number(row.source_bytes),
    takenAt: row.taken_at ? iso(row.taken_at) : null,
    createdAt: iso(row.created_at),
    thumbUrl: `${base}?size=thumb`,
    displayUrl: `${base}?size=display`,
  };
}

/** The assessment, if the viewer may see it (404 otherwise). */
async function visibleAssessment(viewer: SessionUser, assessmentId: string) {
  const assessment = await getAssessment(viewer, assessmentId);
  if (!assessment) throw new NotFoundError('That assessment');
  return assessment;
}

export async function listPhotos(
  viewer: SessionUser,
  assessmentId: string,
  knex: Knex = db(),
): Promise<PhotoRecord[]> {
  await visibleAssessment(viewer, assessmentId);
  const rows = await knex('assessment_photos')
    .where({ assessment_id: assessmentId, organisation_id: viewer.organisationId })
    .orderBy('created_at')
    .select<PhotoRow[]>(columns);
  return rows.map(toRecord);
}

export interface NewPhoto {
  itemKey: string;
  clientRef: string | null;
  caption: string | null;
  /** The device's idea of when the photo was taken; the camera's EXIF time wins when present. */
  takenAt: Date | null;
  fileName: string | null;
  bytes: Buffer;
  /**
   * The camera's file, as the phone read it before reducing it: SHA-256, size and EXIF
   * orientation. The device's word (the server never sees that file); absent when the file
   * was sent unchanged.
   */
  source?: { sha256: string; bytes: number; orientation: number | null } | null;
}

/** Stores a photo for a draft the viewer may edit; `created` is false when the device had already sent it. */
export async function addPhoto(
  viewer: SessionUser,
  assessmentId: string,
  photo: NewPhoto,
): Promise<{ photo: PhotoRecord; created: boolean }> {
  const assessment = await visibleAssessment(viewer, assessmentId);
  assertEditable(viewer, assessment, undefined);
  const knex = db();
  if (photo.clientRef) {
    const again = await knex('assessment_photos')
      .where({ assessment_id: assessmentId, client_ref: photo.clientRef })
      .first<PhotoRow | undefined>(columns);
    if (again) return { photo: toRecord(again), created: false };
  }
  const processed = await processPhoto(photo.bytes);
  const files = storage();
  const [original, display, thumb] = await Promise.all([
    files.put(processed.original.bytes, processed.original.contentType),
    files.put(processed.display.bytes, processed.display.contentType),
    files.put(processed.thumb.bytes, processed.thumb.contentType),
  ]);
  try {
    const [row] = await knex('assessment_photos')
      .insert({
        organisation_id: viewer.organisationId,
        assessment_id: assessmentId,
        item_key: photo.itemKey,
        caption: photo.caption,
        client_ref: photo.clientRef,
        original_filename: photo.fileName,
        original_sha256: original.key,
        original_content_type: processed.original.contentType,
        original_bytes: original.size,
        display_sha256: display.key,
        display_content_type: processed.display.contentType,
        display_bytes: display.size,
        width: processed.display.width,
        height: processed.display.height,
        thumb_sha256: thumb.key,
        thumb_bytes: thumb.size,
        source_sha256: photo.source?.sha256 ?? original.key,
        source_bytes: photo.source?.bytes ?? original.size,
        source_orientation: photo.source?.orientation ?? null,
        taken_at: processed.takenAt ?? photo.takenAt,
        uploaded_by: viewer.id,
      })
      .returning<PhotoRow[]>(columns);
    return { photo: toRecord(row as PhotoRow), created: true };
  } catch (error) {
    if (pgErrorCode(error) !== UNIQUE_VIOLATION || !photo.clientRef) throw error;
    // A simultaneous retry of the same photo won the insert: answer with that one.
    const winner = await knex('assessment_photos')
      .where({ assessment_id: assessmentId, client_ref: photo.clientRef })
      .first<PhotoRow>(columns);
    return { photo: toRecord(winner), created: false };
  }
}

export type PhotoSize = 'thumb' | 'display' | 'original';

/** Where a photo's bytes are, for one size; null when there is no such photo for the viewer. */
export async function photoFile(
  viewer: SessionUser,
  assessmentId: string,
  photoId: string,
  size: PhotoSize,
): Promise<{ key: string; contentType: string } | null> {
  await visibleAssessment(viewer, assessmentId);
  const row = await db()('assessment_photos')
    .where({ id: photoId, assessment_id: assessmentId, organisation_id: viewer.organisationId })
    .first<PhotoRow | undefined>(columns);
  if (!row) return null;
  if (size === 'original') return { key: row.original_sha256, contentType: row.original_content_type };
  if (size === 'thumb' && row.thumb_sha256) return { key: row.thumb_sha256, contentType: 'image/jpeg' };
  return { key: row.display_sha256, contentType: 'image/jpeg' };
}

/** Removes a photo from a draft (its files stay in content-addressed storage, possibly shared). */
export async function removePhoto(
  viewer: SessionUser,
  assessmentId: string,
  photoId: string,
): Promise<boolean> {
  const assessment = await visibleAssessment(viewer, assessmentId);
  assertEditable(viewer, assessment, undefined);
  const deleted = await db()('assessment_photos')
    .where({ id: photoId, assessment_id: assessmentId, organisation_id: viewer.organisationId })
    .delete();
  return deleted > 0;
}
