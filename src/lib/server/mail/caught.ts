/**
 * Read side of the local mail catcher, for the owner's "caught mail" page. The catcher runs
 * as its own process; its HTTP API address comes from MAIL_CATCHER_URL.
 *
 * The catcher keeps every organisation's mail in one place, so the pages show an organisation
 * only what it sent to its own people: a message is visible when it came from this
 * organisation's outbox (its X-Latchwell-Outbox-Id names one of the organisation's rows, and
 * the row was addressed to everyone the message went to) and every recipient is one of the
 * organisation's people (staff, homeowners, client contacts, or someone it invited). Anything
 * else (another organisation's mail, mail from outside the app) is "no such message".
 */
import { db } from '../db';
import type { CaughtMessage, CaughtMessageSummary } from './catcher';

export const defaultCatcherUrl = 'http://127.0.0.1:2526';

const idPattern = /^[0-9a-z-]{10,80}$/;
const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

function catcherUrl(pathname: string) {
  return new URL(pathname, process.env.MAIL_CATCHER_URL ?? defaultCatcherUrl);
}

const lower = (address: string) => address.trim().toLowerCase();

/** The ids (of `messages`) the organisation may read. */
async function visibleIds(
  organisationId: string,
  messages: Pick<CaughtMessageSummary, 'id' | 'to' | 'outboxId'>[],
): Promise<Set<string>> {
  const candidates = messages.filter((m) => m.outboxId && uuidPattern.test(m.outboxId) && m.to.length > 0);
  if (!candidates.length) return new Set();
  const rows: { id: string; to_addresses: string[]; cc_addresses: string[] }[] = await db()('outbox_messages')
    .where({ organisation_id: organisationId })
    .whereIn('id', [...new Set(candidates.map((m) => m.outboxId!.toLowerCase()))])
    .select('id', 'to_addresses', 'cc_addresses');
  const sentTo = new Map(rows.map((r) => [r.id, new Set([...r.to_addresses, ...r.cc_addresses].map(lower))]));
  const addresses = [...new Set(candidates.flatMap((m) => m.to.map(lower)))];
  const people = await db().raw<{ rows: { email: string }[] }>(
    `select lower(email::text) as email from users where organisation_id = ? and lower(email::text) = any(?::text[])
     union select lower(contact_email::text) from clients where organisation_id = ? and lower(contact_email::text) = any(?::text[])
     union select lower(email::text) from invitations where organisation_id = ? and lower(email::text) = any(?::text[])`,
    [organisationId, addresses, organisationId, addresses, organisationId, addresses],
  );
  const own = new Set(people.rows.map((r) => r.email));
  return new Set(
    candidates
      .filter((m) => {
        const row = sentTo.get(m.outboxId!.toLowerCase());
        return row !== undefined && m.to.every((t) => row.has(lower(t)) && own.has(lower(t)));
      })
      .map((m) => m.id),
  );
}

/** The organisation's caught mail, newest first; null when the catcher is not reachable. */
export async function listCaughtMessages(organisationId: string): Promise<CaughtMessageSummary[] | null> {
  const res = await fetch(catcherUrl('/messages')).catch(() => null);
  if (!res?.ok) return null;
  const all = ((await res.json()) as CaughtMessageSummary[]).map((m) => ({
    ...m,
    outboxId: m.outboxId ?? null,
  }));
  const visible = await visibleIds(organisationId, all);
  return all.filter((m) => visible.has(m.id));
}

/** One caught message, or null when there is none or it is not the organisation's. */
export async function getCaughtMessage(id: string, organisationId: string): Promise<CaughtMessage | null> {
  if (!idPattern.test(id)) return null;
  const res = await fetch(catcherUrl(`/messages/${id}`)).catch(() => null);
  if (!res?.ok) return null;
  const message = (await res.json()) as CaughtMessage;
  message.outboxId ??= null;
  return (await visibleIds(organisationId, [message])).has(message.id) ? message : null;
}

/** The bytes of an attachment; call only for a message `getCaughtMessage` returned. */
export async function fetchCaughtAttachment(id: string, index: number): Promise<Response | null> {
  if (!idPattern.test(id) || !Number.isInteger(index) || index < 0) return null;
  const res = await fetch(catcherUrl(`/messages/${id}/attachments/${index}`)).catch(() => null);
  return res?.ok ? res : null;
}
