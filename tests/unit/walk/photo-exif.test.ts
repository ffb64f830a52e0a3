import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { exifTimeToIso, readCameraFacts } from '@/lib/walk/photo-exif';

const jpeg = (exif?: Record<string, string>, orientation?: number) => {
  let img = sharp({ create: { width: 40, height: 30, channels: 3, background: '#333' } }).jpeg();
  if (exif) img = img.withExif({ IFD2: exif });
  if (orientation) img = img.withMetadata({ orientation });
  return img.toBuffer().then((b) => new Blob([new Uint8Array(b)], { type: 'image/jpeg' }));
};

describe('camera facts read on the phone', () => {
  it('reads the time taken with its offset and the orientation', async () => {
    const facts = await readCameraFacts(
      await jpeg({ DateTimeOriginal: '2026:11:30 09:15:00', OffsetTimeOriginal: '+02:00' }, 6),
    );
    expect(facts).toEqual({ takenAt: '2026-11-30T07:15:00.000Z', orientation: 6 });
  });

  it('reads a time without offset as the phone’s own zone', async () => {
    const facts = await readCameraFacts(await jpeg({ DateTimeOriginal: '2026:11:30 09:15:00' }, 8));
    expect(facts).toEqual({ takenAt: new Date(2026, 10, 30, 9, 15, 0).toISOString(), orientation: 8 });
  });

  it('finds nothing in a photo without EXIF, or in a file that is not a photo', async () => {
    expect(await readCameraFacts(await jpeg())).toEqual({ takenAt: null, orientation: null });
    expect(await readCameraFacts(new Blob([new Uint8Array([1, 2, 3])]))).toEqual({
      takenAt: null,
      orientation: null,
    });
  });

  it('refuses a time the calendar does not have, and a malformed offset', () => {
    expect(exifTimeToIso('2026:02:30 10:00:00', undefined)).toBeNull();
    expect(exifTimeToIso('2026:02:28 10:00:00', '+2')).toBe(new Date(2026, 1, 28, 10).toISOString());
    expect(exifTimeToIso('0000:00:00 00:00:00', undefined)).toBeNull();
    expect(exifTimeToIso(20261130, undefined)).toBeNull();
  });
});
