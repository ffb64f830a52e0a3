/**
 * The camera's facts a report needs, read from a photo's EXIF on the phone before the photo
 * is reduced (the reduced copy carries no EXIF): when it was taken and how it was turned.
 * Location is not read: the report does not use it.
 */
import { parse as parseExif } from 'exifr/dist/mini.esm.mjs';

/** EXIF tag numbers (exifr's small build has no tag names). */
const ORIENTATION = 0x0112;
const DATE_TIME_ORIGINAL = 0x9003;
const CREATE_DATE = 0x9004;
const OFFSET_TIME_ORIGINAL = 0x9011;
/** JPEG keeps EXIF in one APP1 segment of at most 64 KB near the start of the file. */
const EXIF_WINDOW_BYTES = 128 * 1024;

/** Only the tags used, by number (exifr's types know tag lists by name only). */
const PICK = {
  ifd0: [ORIENTATION],
  exif: [DATE_TIME_ORIGINAL, CREATE_DATE, OFFSET_TIME_ORIGINAL],
  gps: false,
  translateKeys: false,
  translateValues: false,
  reviveValues: false,
} as unknown as Parameters<typeof parseExif>[1];

export interface CameraFacts {
  takenAt: string | null;
  /** EXIF orientation 1–8. */
  orientation: number | null;
}

/**
 * EXIF times are the camera's wall clock ("2026:11:30 09:15:00"), with the offset when the
 * camera wrote one. Without it, the phone that took the photo is at the gate, so its own time
 * zone is the camera's.
 */
export function exifTimeToIso(value: unknown, offset: unknown): string | null {
  if (typeof value !== 'string') return null;
  const m = /^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/.exec(value.trim());
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map(Number) as [number, number, number, number, number, number];
  const zone = typeof offset === 'string' && /^[+-]\d{2}:\d{2}$/.test(offset.trim()) ? offset.trim() : null;
  const date = zone
    ? new Date(`${m[1]}-${m[2]}-${m[3]}T${m[4]}:${m[5]}:${m[6]}${zone}`)
    : new Date(y, mo - 1, d, h, mi, s);
  // new Date() rolls 2026:02:30 over into March: refuse what the calendar does not have.
  if (Number.isNaN(date.getTime()) || (!zone && (date.getMonth() !== mo - 1 || date.getDate() !== d)))
    return null;
  return date.toISOString();
}

export async function readCameraFacts(file: Blob): Promise<CameraFacts> {
  try {
    const head = new Uint8Array(await file.slice(0, EXIF_WINDOW_BYTES).arrayBuffer());
    const tags = await parseExif(head, PICK);
    const orientation = Number(tags?.[ORIENTATION]);
    return {
      takenAt: exifTimeToIso(tags?.[DATE_TIME_ORIGINAL] ?? tags?.[CREATE_DATE], tags?.[OFFSET_TIME_ORIGINAL]),
      orientation: Number.isInteger(orientation) && orientation >= 1 && orientation <= 8 ? orientation : null,
    };
  } catch {
    // No EXIF, or a file exifr cannot read: the device's file time stands in.
    return { takenAt: null, orientation: null };
  }
}
