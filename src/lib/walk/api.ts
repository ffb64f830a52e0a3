/**
 * The walk-through's calls to /api, each answering with what happened in words the sync loop
 * can act on: saved, refused (with the server's message), a conflict with the current copy,
 * or — by throwing `OfflineError` — no answer at all, so the edit stays queued.
 */
import type { Assessment } from '@/lib/api/assessments';
import type { JsonObject } from './merge-patch';
import type { PhotoSource } from './edit-queue';
import type { PhotoRecord, TraceRecord } from '@/lib/api/uploads';

export type { PhotoRecord, TraceRecord } from '@/lib/api/uploads';

export class OfflineError extends Error {
  constructor(cause?: unknown) {
    super('No connection to the server');
    this.name = 'OfflineError';
    this.cause = cause;
  }
}

export interface Problem {
  status: number;
  title?: string;
  detail?: string;
  errors?: { field: string; message: string }[];
  current?: Assessment;
  [key: string]: unknown;
}

export type Answer<T> = { ok: true; value: T } | { ok: false; problem: Problem };

/** fetch, with a network failure (or a gateway that is not ours) turned into OfflineError. */
async function call(input: string, init: RequestInit = {}): Promise<Response> {
  let response: Response;
  try {
    response = await fetch(input, {
      credentials: 'same-origin',
      ...init,
      headers: { accept: 'application/json', ...init.headers },
    });
  } catch (error) {
    throw new OfflineError(error);
  }
  // A captive portal or proxy error page is not the server's answer either.
  if ([502, 503, 504].includes(response.status)) throw new OfflineError(new Error(`HTTP ${response.status}`));
  return response;
}

async function answer<T>(response: Response): Promise<Answer<T>> {
  const text = await response.text();
  let body: unknown = null;
  try {
    body = text ? JSON.parse(text) : null;
  } catch {
    body = { detail: text.slice(0, 300) };
  }
  if (response.ok) return { ok: true, value: body as T };
  return { ok: false, problem: { status: response.status, ...(body as object) } as Problem };
}

/** Saves a merge patch over the row version this device last saw (`If-Match`). */
export async function patchAssessment(
  id: string,
  rowVersion: number,
  patch: JsonObject,
): Promise<Answer<Assessment>> {
  return answer(
    await call(`/api/assessments/${id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/merge-patch+json', 'if-match': `"${rowVersion}"` },
      body: JSON.stringify(patch),
    }),
  );
}

/** How far an upload has got, in bytes. */
export type UploadProgress = (sent: number, total: number) => void;

/**
 * Sends one photo (multipart) through XMLHttpRequest, the one browser API that reports upload
 * progress. Like `call`: no answer, or a gateway's, is an OfflineError.
 */
export function uploadPhoto(
  assessmentId: string,
  photo: {
    idempotencyKey: string;
    clientRef: string;
    itemKey: string;
    takenAt: string | null;
    fileName: string;
    blob: Blob;
    source?: PhotoSource | null;
  },
  onProgress?: UploadProgress,
): Promise<Answer<PhotoRecord>> {
  const form = new FormData();
  form.set('clientRef', photo.clientRef);
  form.set('itemKey', photo.itemKey);
  if (photo.takenAt) form.set('takenAt', photo.takenAt);
  if (photo.source) {
    form.set('sourceSha256', photo.source.sha256);
    form.set('sourceBytes', String(photo.source.bytes));
    if (photo.source.orientation) form.set('orientation', String(photo.source.orientation));
  }
  form.set('photo', photo.blob, photo.fileName);
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/assessments/${assessmentId}/photos`);
    xhr.setRequestHeader('accept', 'application/json');
    xhr.setRequestHeader('idempotency-key', photo.idempotencyKey);
    xhr.withCredentials = true;
    if (onProgress)
      xhr.upload.onprogress = (event) =>
        onProgress(event.loaded, event.lengthComputable ? event.total : photo.blob.size);
    const lost = () => reject(new OfflineError(new Error('The upload was interrupted')));
    xhr.onerror = lost;
    xhr.onabort = lost;
    xhr.ontimeout = lost;
    xhr.onload = () => {
      if ([0, 502, 503, 504].includes(xhr.status)) return lost();
      resolve(
        answer(
          new Response(xhr.responseText, {
            status: xhr.status,
            headers: { 'content-type': xhr.getResponseHeader('content-type') ?? '' },
          }),
        ),
      );
    };
    xhr.send(form);
  });
}

export async function removePhoto(assessmentId: string, photoId: string): Promise<Answer<null>> {
  return answer(await call(`/api/assessments/${assessmentId}/photos/${photoId}`, { method: 'DELETE' }));
}

export async function uploadTrace(
  assessmentId: string,
  trace: {
    clientRef: string;
    itemKey: string;
    fileName: string;
    csv: string;
    location: string;
    direction: string;
    gapMm: number;
  },
  idempotencyKey: string,
): Promise<Answer<TraceRecord>> {
  const query = new URLSearchParams({
    clientRef: trace.clientRef,
    itemKey: trace.itemKey,
    fileName: trace.fileName,
    location: trace.location,
    direction: trace.direction,
    gapMm: String(trace.gapMm),
  });
  return answer(
    await call(`/api/assessments/${assessmentId}/force-traces?${query}`, {
      method: 'POST',
      headers: { 'content-type': 'text/csv', 'idempotency-key': idempotencyKey },
      body: trace.csv,
    }),
  );
}

export async function removeTrace(assessmentId: string, traceId: string): Promise<Answer<null>> {
  return answer(await call(`/api/assessments/${assessmentId}/force-traces/${traceId}`, { method: 'DELETE' }));
}

/** Scores the current answers without storing anything (the live preview). */
export async function scorePreview(body: {
  family: string;
  version?: string;
  input: unknown;
}): Promise<Answer<unknown>> {
  return answer(
    await call('/api/score', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(body),
    }),
  );
}

export async function submitAssessment(id: string, rowVersion: number): Promise<Answer<Assessment>> {
  return answer(
    await call(`/api/assessments/${id}/submit`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'if-match': `"${rowVersion}"` },
      body: '{}',
    }),
  );
}
