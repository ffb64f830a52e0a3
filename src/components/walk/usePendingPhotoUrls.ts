/** Object URLs for photos still waiting on the device, so they show before they are uploaded. */
import { useEffect, useRef, useState } from 'react';
import { photoBlob, type QueuedEdit } from '@/lib/walk/edit-queue';

export function usePendingPhotoUrls(pending: readonly QueuedEdit[]): Record<string, string> {
  const known = useRef(new Map<string, string>());
  const [urls, setUrls] = useState<Record<string, string>>({});
  const refs = pending.flatMap((op) => (op.kind === 'photo' ? [op.clientRef] : [])).join(',');

  useEffect(() => {
    let cancelled = false;
    const wanted = refs ? refs.split(',') : [];
    void (async () => {
      for (const ref of wanted) {
        if (known.current.has(ref)) continue;
        const blob = await photoBlob(ref);
        if (blob) known.current.set(ref, URL.createObjectURL(blob));
      }
      for (const [ref, url] of known.current) {
        if (!wanted.includes(ref)) {
          // Keep showing it a moment: the uploaded thumbnail replaces it on the next render.
          setTimeout(() => URL.revokeObjectURL(url), 5000);
          known.current.delete(ref);
        }
      }
      if (!cancelled) setUrls(Object.fromEntries(known.current));
    })();
    return () => {
      cancelled = true;
    };
  }, [refs]);
  return urls;
}
