/**
 * The archive islands' calls to /api: JSON on success; otherwise an ArchiveApiError carrying
 * the server's problem detail, so the UI can say what went wrong in the server's words.
 */
import type { ArchivePage } from '@/lib/api/archive';

export class ArchiveApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message);
  }
}

export async function getJson<T>(url: string, signal?: AbortSignal): Promise<T> {
  let response: Response;
  try {
    response = await fetch(url, {
      credentials: 'same-origin',
      headers: { accept: 'application/json' },
      signal,
    });
  } catch (error) {
    if ((error as Error).name === 'AbortError') throw error;
    throw new ArchiveApiError(0, 'No connection to the server. Try again in a moment.');
  }
  const body = await response.json().catch(() => null);
  if (!response.ok) {
    const fields = (body?.errors ?? [])
      .map((e: { field: string; message: string }) => `${e.field}: ${e.message}`)
      .join('; ');
    throw new ArchiveApiError(
      response.status,
      [body?.detail ?? `The server answered ${response.status}.`, fields].filter(Boolean).join(' '),
    );
  }
  return body as T;
}

export const fetchArchivePage = (query: string, signal?: AbortSignal) =>
  getJson<ArchivePage>(`/api/archive?${query}`, signal);
export const fetchArchiveCount = (query: string, signal?: AbortSignal) =>
  getJson<{ total: number }>(`/api/archive/count?${query}`, signal);
