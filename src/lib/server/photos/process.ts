/**
 * Turns a photo as the phone sent it into what the report and the walk-through show: the type
 * checked from the bytes (never from the name or the browser's claim), EXIF orientation
 * applied, a display size and a thumbnail as JPEG without location metadata, and the time the
 * picture was taken when the camera recorded it.
 */
import exifReader from 'exif-reader';
import { fileTypeFromBuffer } from 'file-type';
import sharp, { type Metadata } from 'sharp';
import { MAX_PHOTO_BYTES, megabytes } from '@/lib/api/uploads';
import { InvalidInputError, TooLargeError, UnsupportedTypeError } from '../errors';

export { MAX_PHOTO_BYTES } from '@/lib/api/uploads';
/** Longest side of the display size, px: sharp on a report page and a tablet. */
export const DISPLAY_LONG_SIDE_PX = 1600;
/** Longest side of the thumbnail, px: the walk-through's photo strip. */
export const THUMB_LONG_SIDE_PX = 320;
/** Refuse decompression bombs: more pixels than a 100 MP sensor makes. */
const MAX_INPUT_PIXELS = 100_000_000;

/** What a camera or a gallery gives us that sharp's prebuilt libvips can read. */
export const ACCEPTED_PHOTO_TYPES: Readonly<Record<string, string>> = Object.freeze({
  'image/jpeg': 'JPEG',
  'image/png': 'PNG',
  'image/webp': 'WebP',
  'image/avif': 'AVIF',
});

export interface ProcessedPhoto {
  original: { bytes: Buffer; contentType: string };
  display: { bytes: Buffer; contentType: 'image/jpeg'; width: number; height: number };
  thumb: { bytes: Buffer; contentType: 'image/jpeg'; width: number; height: number };
  /** From the camera's EXIF DateTimeOriginal, when present. */
  takenAt: Date | null;
}

/** The size refusal, in words a technician can act on. */
export function tooLargeProblem(bytes: number | null): TooLargeError {
  const limit = megabytes(MAX_PHOTO_BYTES);
  const size =
    bytes === null
      ? `This photo is larger than the ${limit} limit.`
      : `This photo is ${megabytes(bytes)}; the limit is ${limit}.`;
  return new TooLargeError(
    `${size} Take it again at a lower resolution, or pick a smaller copy.`,
    [{ field: 'photo', message: `must be at most ${limit}` }],
    { limitBytes: MAX_PHOTO_BYTES },
  );
}

function exifTakenAt(exif: Buffer | undefined): Date | null {
  if (!exif) return null;
  try {
    const tags = exifReader(exif);
    const taken = tags.Photo?.DateTimeOriginal ?? tags.Photo?.DateTimeDigitized ?? null;
    return taken instanceof Date && !Number.isNaN(taken.getTime()) ? taken : null;
  } catch {
    return null;
  }
}

/**
 * Checks and converts one uploaded photo; throws TooLargeError, UnsupportedTypeError or
 * InvalidInputError with a plain message.
 */
export async function processPhoto(bytes: Buffer): Promise<ProcessedPhoto> {
  if (bytes.byteLength > MAX_PHOTO_BYTES) throw tooLargeProblem(bytes.byteLength);
  if (bytes.byteLength === 0)
    throw new InvalidInputError('The photo file is empty.', [
      { field: 'photo', message: 'must not be empty' },
    ]);
  const type = await fileTypeFromBuffer(bytes);
  if (!type || !ACCEPTED_PHOTO_TYPES[type.mime]) {
    const found = type ? `a ${type.ext.toUpperCase()} file` : 'not a picture we recognise';
    throw new UnsupportedTypeError(`That file is ${found}. Send a JPEG, PNG, WebP or AVIF photo.`, [
      { field: 'photo', message: `must be one of: ${Object.values(ACCEPTED_PHOTO_TYPES).join(', ')}` },
    ]);
  }
  let metadata: Metadata;
  try {
    metadata = await sharp(bytes, { limitInputPixels: MAX_INPUT_PIXELS }).metadata();
  } catch {
    throw new InvalidInputError('The photo could not be read; it may be damaged. Take it again.', [
      { field: 'photo', message: 'could not be decoded' },
    ]);
  }
  const oriented = () => sharp(bytes, { limitInputPixels: MAX_INPUT_PIXELS }).rotate();
  const render = async (longSide: number, quality: number) => {
    const { data, info } = await oriented()
      .resize({ width: longSide, height: longSide, fit: 'inside', withoutEnlargement: true })
      .flatten({ background: '#ffffff' })
      .jpeg({ quality, mozjpeg: true })
      .toBuffer({ resolveWithObject: true });
    return { bytes: data, contentType: 'image/jpeg' as const, width: info.width, height: info.height };
  };
  try {
    const [display, thumb] = await Promise.all([
      render(DISPLAY_LONG_SIDE_PX, 82),
      render(THUMB_LONG_SIDE_PX, 70),
    ]);
    return {
      original: { bytes, contentType: type.mime },
      display,
      thumb,
      takenAt: exifTakenAt(metadata.exif),
    };
  } catch {
    throw new InvalidInputError('The photo could not be converted; it may be damaged. Take it again.', [
      { field: 'photo', message: 'could not be decoded' },
    ]);
  }
}
