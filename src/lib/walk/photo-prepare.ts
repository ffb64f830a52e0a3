/**
 * Makes a camera photo fit a weak signal before it is queued: the facts the report needs are
 * read from the camera's file first (its SHA-256 and size, the EXIF time it was taken and its
 * orientation), then a copy at most 2048 px on the longest side is written as JPEG (quality
 * 0.8), upright, without EXIF (so no location leaves the phone). Loaded only when a photo is
 * added, so the walk-through's first script stays small.
 */
import imageCompression from 'browser-image-compression';
import { readCameraFacts } from './photo-exif';
import { UPLOAD_JPEG_QUALITY, UPLOAD_LONG_SIDE_PX } from '@/lib/api/uploads';

export interface PreparedPhoto {
  /** What is uploaded: the reduced copy, or the camera's file when reducing does not make it smaller. */
  blob: Blob;
  fileName: string;
  /** From EXIF DateTimeOriginal when the camera wrote it, else the file's time on the device. */
  takenAt: string | null;
  /** The camera file's facts, kept by the server beside the reduced copy. */
  source: { sha256: string; bytes: number; orientation: number | null } | null;
}

async function sha256Hex(blob: Blob): Promise<string | null> {
  // crypto.subtle exists only on HTTPS (and localhost); without it the server keeps the upload's own hash.
  if (!globalThis.crypto?.subtle) return null;
  const digest = await crypto.subtle.digest('SHA-256', await blob.arrayBuffer());
  return [...new Uint8Array(digest)].map((b) => b.toString(16).padStart(2, '0')).join('');
}

/** The picture type from the first bytes (never the name or the browser's claim), as the server does. */
export function sniffReducibleType(head: Uint8Array): string | null {
  const at = (i: number, ...bytes: number[]) => bytes.every((b, k) => head[i + k] === b);
  if (at(0, 0xff, 0xd8, 0xff)) return 'image/jpeg';
  if (at(0, 0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a)) return 'image/png';
  if (at(0, 0x52, 0x49, 0x46, 0x46) && at(8, 0x57, 0x45, 0x42, 0x50)) return 'image/webp';
  return null;
}

export async function preparePhoto(file: File): Promise<PreparedPhoto> {
  const fileTime = file.lastModified ? new Date(file.lastModified).toISOString() : null;
  const fileName = file.name || 'photo.jpg';
  const type = sniffReducibleType(new Uint8Array(await file.slice(0, 16).arrayBuffer()));
  // Sent unchanged (not a picture this page can redraw): the server judges it and hashes it itself.
  if (!type) return { blob: file, fileName, takenAt: fileTime, source: null };
  const [exif, sha256] = await Promise.all([readCameraFacts(file), sha256Hex(file)]);
  const takenAt = exif.takenAt ?? fileTime;
  let reduced: Blob | null = null;
  try {
    reduced = await imageCompression(file, {
      maxWidthOrHeight: UPLOAD_LONG_SIDE_PX,
      initialQuality: UPLOAD_JPEG_QUALITY,
      fileType: 'image/jpeg',
      // The worker build would be fetched from a CDN: not there without signal.
      useWebWorker: false,
    });
  } catch {
    // Not decodable here (damaged): the server judges the file itself.
  }
  if (!reduced || reduced.size >= file.size) return { blob: file, fileName, takenAt, source: null };
  const source = sha256 ? { sha256, bytes: file.size, orientation: exif.orientation } : null;
  return { blob: reduced, fileName: fileName.replace(/\.(png|webp|jpe?g)$/i, '') + '.jpg', takenAt, source };
}
