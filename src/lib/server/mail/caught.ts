/**
 * Read side of the local mail catcher, for the owner's "caught mail" page. The catcher runs
 * as its own process; its HTTP API address comes from MAIL_CATCHER_URL.
 */
import type { CaughtMessage, CaughtMessageSummary } from './catcher';

export const defaultCatcherUrl = 'http://127.0.0.1:2526';

function catcherUrl(pathname: string) {
  return new URL(pathname, process.env.MAIL_CATCHER_URL ?? defaultCatcherUrl);
}

export async function listCaughtMessages(): Promise<CaughtMessageSummary[] | null> {
  const res = await fetch(catcherUrl('/messages')).catch(() => null);
  return res?.ok ? ((await res.json()) as CaughtMessageSummary[]) : null;
}

export async function getCaughtMessage(id: string): Promise<CaughtMessage | null> {
  if (!/^[0-9a-z-]{10,80}$/.test(id)) return null;
  const res = await fetch(catcherUrl(`/messages/${id}`)).catch(() => null);
  return res?.ok ? ((await res.json()) as CaughtMessage) : null;
}

export async function fetchCaughtAttachment(id: string, index: number): Promise<Response | null> {
  if (!/^[0-9a-z-]{10,80}$/.test(id) || !Number.isInteger(index) || index < 0) return null;
  const res = await fetch(catcherUrl(`/messages/${id}/attachments/${index}`)).catch(() => null);
  return res?.ok ? res : null;
}
