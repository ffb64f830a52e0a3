/**
 * Photos of one item: take one with the camera or pick one, see thumbnails (those still on
 * the phone marked as waiting, the one being sent with its progress, a stopped one with
 * Retry), remove one. A photo is reduced on the phone before it is queued
 * (`photo-prepare.ts`); one still over the limit is refused here with the limit in the message.
 */
import { useId, useState, useSyncExternalStore, type ReactNode } from 'react';
import { newClientRef } from '@/lib/walk/entry';
import { MAX_PHOTO_BYTES, megabytes, type PhotoRecord } from '@/lib/api/uploads';
import type { PhotoUpload } from '@/lib/walk/sync';
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
  const uploads = useSyncExternalStore(
    sync.subscribe,
    () => sync.getState().uploads,
    () => sync.getState().uploads,
  );
  const [message, setMessage] = useState<string | null>(null);
  const [preparing, setPreparing] = useState(0);
  const id = useId();

  const add = async (files: FileList | null) => {
    const file = files?.[0];
    if (!file) return;
    if (file.type && !file.type.startsWith('image/')) {
      setMessage('That file is not a picture. Send a JPEG, PNG, WebP or AVIF photo.');
      return;
    }
    setMessage(null);
    setPreparing((n) => n + 1);
    try {
      const { preparePhoto } = await import('@/lib/walk/photo-prepare');
      const photo = await preparePhoto(file);
      if (photo.blob.size > MAX_PHOTO_BYTES) {
        setMessage(
          `This photo is ${megabytes(photo.blob.size)}; the limit is ${megabytes(MAX_PHOTO_BYTES)}. Take it again at a lower resolution, or pick a smaller copy.`,
        );
        return;
      }
      await sync.addPhoto(
        {
          clientRef: newClientRef(),
          itemKey,
          fileName: photo.fileName,
          takenAt: photo.takenAt,
          source: photo.source,
        },
        photo.blob,
      );
    } catch {
      setMessage('The photo could not be read on this phone. Take it again.');
    } finally {
      setPreparing((n) => n - 1);
    }
  };

  const count = photos.length + pending.length;
  const stopped = pending.map((p) => uploads[p.clientRef]?.failed).find(Boolean) ?? null;
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
                <span className="flex size-18 items-center justify-center rounded-md border-2 border-dashed border-brass-500 text-xs">
                  photo
                </span>
              )}
              <UploadState upload={uploads[photo.clientRef]} fileName={photo.fileName} />
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
              <path
                d="M4 8h3l2-3h6l2 3h3v11H4z"
                fill="none"
                stroke="currentColor"
                strokeWidth="2"
                strokeLinejoin="round"
              />
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
                void add(e.target.files);
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
                void add(e.target.files);
                e.target.value = '';
              }}
            />
          </label>
        </div>
      )}
      {stopped && (
        <p
          className="mt-2 flex flex-wrap items-center gap-2 rounded-md bg-brass-100 px-3 py-2 text-sm text-iron-900"
          data-upload-failed
        >
          <span>
            <strong>Photo not sent yet.</strong> {stopped}
          </span>
          {editable && (
            <button type="button" className="btn-secondary" onClick={() => void sync.retryUploads()}>
              Retry now
            </button>
          )}
        </p>
      )}
      {preparing > 0 && (
        <p role="status" className="mt-2 text-sm text-iron-700">
          Making the photo smaller for sending…
        </p>
      )}
      {message && (
        <p
          id={id}
          role="alert"
          className="mt-2 rounded-md bg-withdraw/10 px-3 py-2 text-sm font-semibold text-withdraw"
        >
          {message}
        </p>
      )}
    </div>
  );
}

/** Under a waiting photo: "waiting", or how much of it is sent while it goes. */
function UploadState({ upload, fileName }: { upload: PhotoUpload | undefined; fileName: string }) {
  const bar =
    'absolute right-0 bottom-0 left-0 rounded-b-md bg-brass-100/95 text-center text-xs font-semibold text-iron-900';
  if (upload && !upload.failed) {
    const percent = upload.total > 0 ? Math.min(100, Math.round((upload.sent / upload.total) * 100)) : 0;
    return (
      <span className={bar} data-upload-progress={percent}>
        <progress
          className="block h-1.5 w-full accent-iron-800"
          max={100}
          value={percent}
          aria-label={`Sending ${fileName}`}
        />
        {percent}%
      </span>
    );
  }
  return <span className={bar}>waiting</span>;
}
