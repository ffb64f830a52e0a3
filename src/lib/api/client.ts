/**
 * The browser's one client for /api: every island's call goes through `request` (or
 * `upload`, for a photo with progress). Each answers `{ ok: true, value }` or `{ ok: false,
 * problem }` with the one `Problem` shape (./problem.ts); a network failure, or a gateway's
 * error page (502/503/504), is an `OfflineError` from `request` — the walk-through's sync loop
 * keeps the edit queued on it — and a status-0 problem from `send`, for islands that just show
 * a message. Endpoint functions below name each call an island makes.
 */
import type { ArchivePage } from './archive';
import type { Assessment, SavedDraft } from './assessments';
import type { ImpactReport, ImpactRunView } from './impact';
import type { AmendmentPatch, RulesetVersionDetail } from './rulesets';
import type { PhotoRecord, TraceRecord } from './uploads';
import { offlineProblem, problemMessage, toProblem, type Problem } from './problem';
import type { RulesetDiff } from '@/lib/rules/diff';

export class OfflineError extends Error {
  constructor(cause?: unknown) {
    super('No connection to the server');
    this.name = 'OfflineError';
    this.cause = cause;
  }
}

export type ApiResult<T> = { ok: true; value: T } | { ok: false; problem: Problem };

export interface RequestOptions {
  /** JSON (serialised here) unless `raw` is given. */
  body?: unknown;
  /** A body sent as it is, with its own content type (a CSV, a merge patch). */
  raw?: { text: string; contentType: string };
  headers?: Record<string, string>;
  signal?: AbortSignal;
}

/** Statuses a gateway or captive portal answers with: not the server's own answer. */
const GATEWAY = [502, 503, 504];

async function read<T>(response: Response): Promise<ApiResult<T>> {
  const text = response.status === 204 ? '' : await response.text();
  let body: unknown = null;
  try {
    body = text ? JSON.parse(text) : null;
  } catch {
    body = { detail: text.slice(0, 300) };
  }
  if (response.ok) return { ok: true, value: body as T };
  return { ok: false, problem: toProblem(response.status, body) };
}

/** One call to /api; throws OfflineError when no answer of the server's came back. */
export async function request<T>(
  method: string,
  path: string,
  options: RequestOptions = {},
): Promise<ApiResult<T>> {
  const headers: Record<string, string> = { accept: 'application/json', ...options.headers };
  let body: string | undefined;
  if (options.raw) {
    headers['content-type'] = options.raw.contentType;
    body = options.raw.text;
  } else if (options.body !== undefined) {
    headers['content-type'] = 'application/json';
    body = JSON.stringify(options.body);
  }
  let response: Response;
  try {
    response = await fetch(path, {
      method,
      credentials: 'same-origin',
      headers,
      body,
      signal: options.signal,
    });
  } catch (error) {
    if ((error as Error)?.name === 'AbortError') throw error;
    throw new OfflineError(error);
  }
  if (GATEWAY.includes(response.status)) throw new OfflineError(new Error(`HTTP ${response.status}`));
  return read<T>(response);
}

/** Like `request`, but no connection is a problem with status 0 (for islands that show a message). */
export async function send<T>(
  method: string,
  path: string,
  options: RequestOptions = {},
): Promise<ApiResult<T>> {
  try {
    return await request<T>(method, path, options);
  } catch (error) {
    if (error instanceof OfflineError) return { ok: false, problem: offlineProblem() };
    throw error;
  }
}

/** How far an upload has got, in bytes. */
export type UploadProgress = (sent: number, total: number) => void;

/**
 * A multipart POST through XMLHttpRequest, the one browser API that reports upload progress.
 * Like `request`: no answer, or a gateway's, is an OfflineError.
 */
export function upload<T>(
  path: string,
  form: FormData,
  options: { headers?: Record<string, string>; onProgress?: UploadProgress; size: number },
): Promise<ApiResult<T>> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', path);
    xhr.setRequestHeader('accept', 'application/json');
    for (const [name, value] of Object.entries(options.headers ?? {})) xhr.setRequestHeader(name, value);
    xhr.withCredentials = true;
    if (options.onProgress) {
      const report = options.onProgress;
      xhr.upload.onprogress = (event) =>
        report(event.loaded, event.lengthComputable ? event.total : options.size);
    }
    const lost = () => reject(new OfflineError(new Error('The upload was interrupted')));
    xhr.onerror = lost;
    xhr.onabort = lost;
    xhr.ontimeout = lost;
    xhr.onload = () => {
      if (xhr.status === 0 || GATEWAY.includes(xhr.status)) return lost();
      resolve(
        read<T>(
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

const enc = encodeURIComponent;

// ---------------------------------------------------------------------------------------------
// The walk-through (sync loop: OfflineError keeps an edit queued)

/**
 * Saves a merge patch over the row version this device last saw (`If-Match`). The walk-through
 * keeps only the new version and the documents as stored, so it asks for the minimal answer.
 */
export function patchAssessment(
  id: string,
  rowVersion: number,
  patch: unknown,
): Promise<ApiResult<SavedDraft>> {
  return request('PATCH', `/api/assessments/${enc(id)}`, {
    raw: { text: JSON.stringify(patch), contentType: 'application/merge-patch+json' },
    headers: { 'if-match': `"${rowVersion}"`, prefer: 'return=minimal' },
  });
}

export function submitAssessment(id: string, rowVersion: number): Promise<ApiResult<Assessment>> {
  return request('POST', `/api/assessments/${enc(id)}/submit`, {
    body: {},
    headers: { 'if-match': `"${rowVersion}"` },
  });
}

/** Sends one photo (multipart) with progress; the key makes a retry after a lost answer harmless. */
export function uploadPhoto(
  assessmentId: string,
  photo: {
    idempotencyKey: string;
    clientRef: string;
    itemKey: string;
    takenAt: string | null;
    fileName: string;
    blob: Blob;
    source?: { sha256: string; bytes: number; orientation: number | null } | null;
  },
  onProgress?: UploadProgress,
): Promise<ApiResult<PhotoRecord>> {
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
  return upload(`/api/assessments/${enc(assessmentId)}/photos`, form, {
    headers: { 'idempotency-key': photo.idempotencyKey },
    onProgress,
    size: photo.blob.size,
  });
}

export function removePhoto(assessmentId: string, photoId: string): Promise<ApiResult<null>> {
  return request('DELETE', `/api/assessments/${enc(assessmentId)}/photos/${enc(photoId)}`);
}

export function uploadTrace(
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
): Promise<ApiResult<TraceRecord>> {
  const query = new URLSearchParams({
    clientRef: trace.clientRef,
    itemKey: trace.itemKey,
    fileName: trace.fileName,
    location: trace.location,
    direction: trace.direction,
    gapMm: String(trace.gapMm),
  });
  return request('POST', `/api/assessments/${enc(assessmentId)}/force-traces?${query}`, {
    raw: { text: trace.csv, contentType: 'text/csv' },
    headers: { 'idempotency-key': idempotencyKey },
  });
}

export function removeTrace(assessmentId: string, traceId: string): Promise<ApiResult<null>> {
  return request('DELETE', `/api/assessments/${enc(assessmentId)}/force-traces/${enc(traceId)}`);
}

/** Scores the current answers without storing anything (the live preview). */
export function scorePreview(body: {
  family: string;
  version?: string;
  input: unknown;
}): Promise<ApiResult<unknown>> {
  return request('POST', '/api/score', { body });
}

// ---------------------------------------------------------------------------------------------
// Assessments, signing and mail (no connection: a status-0 problem)

/** Starts a draft; the key makes a retry after a lost answer (or a double tap) start only one. */
export function startAssessment(
  body: { gateId: string; family: string; purpose: string; carryForward?: boolean },
  idempotencyKey: string,
): Promise<ApiResult<Assessment>> {
  return send('POST', '/api/assessments', { body, headers: { 'idempotency-key': idempotencyKey } });
}

export function discardDraft(assessmentId: string): Promise<ApiResult<null>> {
  return send('DELETE', `/api/assessments/${enc(assessmentId)}`);
}

export function sendForSignature(
  assessmentId: string,
  body: { expiresInDays: number; recipient: string },
): Promise<ApiResult<unknown>> {
  return send('POST', `/api/assessments/${enc(assessmentId)}/send-for-signature`, { body });
}

export function startRevision(assessmentId: string): Promise<ApiResult<Assessment>> {
  return send('POST', `/api/assessments/${enc(assessmentId)}/revise`, { body: {} });
}

export function signingStatus<T>(assessmentId: string): Promise<ApiResult<T>> {
  return send('GET', `/api/assessments/${enc(assessmentId)}/signing`);
}

export function submitSignature<T>(token: string, body: unknown): Promise<ApiResult<T>> {
  return send('POST', `/api/sign/${enc(token)}/submit`, { body });
}

// ---------------------------------------------------------------------------------------------
// The archive

export function archivePage(query: string, signal?: AbortSignal): Promise<ApiResult<ArchivePage>> {
  return send('GET', `/api/archive?${query}`, { signal });
}

export function impactReport(query: string, signal?: AbortSignal): Promise<ApiResult<ImpactReport>> {
  return send('GET', `/api/archive/impact?${query}`, { signal });
}

export function impactRun(query: string, signal?: AbortSignal): Promise<ApiResult<ImpactRunView>> {
  return send('GET', `/api/archive/impact/run?${query}`, { signal });
}

export function startImpactRun(body: { versionId: string; basis: string }): Promise<ApiResult<unknown>> {
  return send('POST', '/api/archive/impact/run', { body });
}

export function carriedForward(assessmentId: string): Promise<ApiResult<{ pending: string[] }>> {
  return send('GET', `/api/assessments/${enc(assessmentId)}/carried-forward`);
}

export function confirmCarriedForward(assessmentId: string, keys: string[]): Promise<ApiResult<unknown>> {
  return send('POST', `/api/assessments/${enc(assessmentId)}/carried-forward`, { body: { keys } });
}

export function duplicateGate(gateId: string, label?: string): Promise<ApiResult<{ id: string }>> {
  return send('POST', `/api/gates/${enc(gateId)}/duplicate`, { body: label ? { label } : {} });
}

export function jobList<T>(): Promise<ApiResult<T>> {
  return send('GET', '/api/jobs');
}

export function retryJob(id: string): Promise<ApiResult<unknown>> {
  return send('POST', `/api/jobs/${enc(id)}/retry`);
}

export function archiveCount(query: string, signal?: AbortSignal): Promise<ApiResult<{ total: number }>> {
  return send('GET', `/api/archive/count?${query}`, { signal });
}

// ---------------------------------------------------------------------------------------------
// Rulesets: amendments and differences

const versionPath = (family: string, version: string) => `/api/rulesets/${enc(family)}/${enc(version)}`;

export const amendDraft = (family: string, version: string, patch: AmendmentPatch) =>
  send<RulesetVersionDetail>('PATCH', versionPath(family, version), { body: patch });

export const publishDraft = (family: string, version: string) =>
  send<RulesetVersionDetail>('POST', `${versionPath(family, version)}/publish`);

export const deleteDraft = (family: string, version: string) =>
  send<null>('DELETE', versionPath(family, version));

export function rulesetDiff(
  family: string,
  query: { from: string; to: string; fromFamily?: string },
): Promise<ApiResult<RulesetDiff>> {
  const params = new URLSearchParams({
    from: query.from,
    to: query.to,
    ...(query.fromFamily ? { fromFamily: query.fromFamily } : {}),
  });
  return send('GET', `/api/rulesets/${enc(family)}/diff?${params}`);
}

// ---------------------------------------------------------------------------------------------
// For query libraries that expect a throw

/** A problem as an Error, for code (react-query) that expects a failed call to throw. */
export class ProblemError extends Error {
  constructor(readonly problem: Problem) {
    super([problemMessage(problem), ...problem.errors.map((e) => e.message)].join(' '));
    this.name = 'ProblemError';
  }
}

/** The value of a call, or a ProblemError. */
export async function valueOf<T>(result: Promise<ApiResult<T>>): Promise<T> {
  const answer = await result;
  if (!answer.ok) throw new ProblemError(answer.problem);
  return answer.value;
}
