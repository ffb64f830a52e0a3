/**
 * Photos of one item: take one with the camera or pick one, see thumbnails (those still on
 * the phone marked as waiting), remove one. A photo over the limit is refused here, before it
 * is queued, with the limit in the message.
 */
import { useId, useState, type ReactNode } from 'react';
import { newClientRef } from '@/lib/walk/entry';
import { MAX_PHOTO_BYTES, megabytes, type PhotoRecord } from '@/lib/walk/records';
import { useWalkActions } from './context';

export interface PendingPhoto {
  clientRef: string;
  fileName: string;
  url: string | undefined;
}

interface Props {
  itemKey: string;
  label: string;
  photos: readonly PhotoRecord[];
  pending: readonly PendingPhoto[];
  /** Shown first in the row of buttons (the item's note button). */
  before?: ReactNode;
}

export function PhotoStrip({ itemKey, label, photos, pending, before }: Props) {
  const { sync, editable } = useWalkActions();
  const [message, setMessage] = useState<string | null>(null);
  const id = useId();

  const add = (files: FileList | null) => {
    const file = files?.[0];
    if (!file) return;
    if (file.size > MAX_PHOTO_BYTES) {
      setMessage(
        `This photo is ${megabytes(file.size)}; the limit is ${megabytes(MAX_PHOTO_BYTES)}. Take it again at a lower resolution, or pick a smaller copy.`,
      );
      return;
    }
    if (file.type && !file.type.startsWith('image/')) {
      setMessage('That file is not a picture. Send a JPEG, PNG, WebP or AVIF photo.');
      return;
    }
    setMessage(null);
    void sync.addPhoto(
      { clientRef: newClientRef(), itemKey, fileName: file.name || 'photo.jpg', takenAt: file.lastModified ? new Date(file.lastModified).toISOString() : null },
      file,
    );
  };

  const count = photos.length + pending.length;
  return (
    <div className="mt-3">
      {count > 0 && (
        <ul className="mb-2 flex flex-wrap gap-2" aria-label={`Photos of: ${label}`}>
          {photos.map((photo) => (
            <li key={photo.id} className="relative">
              <a href={photo.displayUrl} target="_blank" rel="noopener" className="block">
                <img
                  src={photo.thumbUrl}
                  alt={`Photo ${photo.takenAt ? `taken ${new Date(photo.takenAt).toLocaleString()}` : ''}`}
                  width={72}
                  height={72}
                  className="size-18 rounded-md border border-iron-200 object-cover"
                />
              </a>
              {editable && (
                <button
                  type="button"
                  className="absolute -top-3 -right-3 flex size-10 items-center justify-center rounded-full border border-iron-200 bg-white text-lg text-iron-800 shadow-sm"
                  aria-label="Remove this photo"
                  onClick={() => void sync.remove('removePhoto', photo.clientRef ?? photo.id, photo.id)}
                >
                  ×
                </button>
              )}
            </li>
          ))}
          {pending.map((photo) => (
            <li key={photo.clientRef} className="relative">
              {photo.url ? (
                <img
                  src={photo.url}
                  alt={`Photo ${photo.fileName}, waiting to upload`}
                  width={72}
                  height={72}
                  className="size-18 rounded-md border-2 border-dashed border-brass-500 object-cover"
                />
              ) : (
                <span className="flex size-18 items-center justify-center rounded-md border-2 border-dashed border-brass-500 text-xs">photo</span>
              )}
              <span className="absolute right-0 bottom-0 left-0 rounded-b-md bg-brass-100/95 text-center text-xs font-semibold text-iron-900">waiting</span>
              {editable && (
                <button
                  type="button"
                  className="absolute -top-3 -right-3 flex size-10 items-center justify-center rounded-full border border-iron-200 bg-white text-lg text-iron-800 shadow-sm"
                  aria-label="Remove this photo"
                  onClick={() => void sync.remove('removePhoto', photo.clientRef, null)}
                >
                  ×
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
      {editable && (
        <div className="flex flex-wrap items-center gap-2">
          {before}
          <label className="btn-secondary min-h-11 cursor-pointer focus-within:outline-3 focus-within:outline-offset-2 focus-within:outline-brass-500">
            <svg width="20" height="20" viewBox="0 0 24 24" aria-hidden="true">
              <path d="M4 8h3l2-3h6l2 3h3v11H4z" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
              <circle cx="12" cy="13" r="3.5" fill="none" stroke="currentColor" strokeWidth="2" />
            </svg>
            Take photo
            <input
              type="file"
              accept="image/*"
              capture="environment"
              className="sr-only"
              aria-describedby={message ? id : undefined}
              onChange={(e) => {
                add(e.target.files);
                e.target.value = '';
              }}
            />
          </label>
          <label className="btn-secondary min-h-11 cursor-pointer focus-within:outline-3 focus-within:outline-offset-2 focus-within:outline-brass-500">
            Pick a photo
            <input
              type="file"
              accept="image/*"
              className="sr-only"
              data-photo-pick={itemKey}
              onChange={(e) => {
                add(e.target.files);
                e.target.value = '';
              }}
            />
          </label>
        </div>
      )}
      {message && (
        <p id={id} role="alert" className="mt-2 rounded-md bg-withdraw/10 px-3 py-2 text-sm font-semibold text-withdraw">
          {message}
        </p>
      )}
    </div>
  );
}
