/**
 * Keeps the per-request cost of a session small: this process remembers, for a short time, that
 * a session cookie decoded to a given token and that the session it names held (user active,
 * `session_version` matching, session id not revoked), so a signed-in request neither decrypts
 * the cookie nor asks the database again while that answer is fresh.
 *
 * How long a change can go unseen:
 * - On this process, never: every statement this process sends that writes `users`,
 *   `organisations` or `revoked_sessions` forgets every remembered check, once when it is sent
 *   and again when it is done (or, inside a transaction, when the transaction commits or rolls
 *   back), and a check that was already reading the database when that happened is not kept.
 *   Sign-out, a password change or reset, a role change, deactivation and an organisation's
 *   settings all write one of those tables.
 * - Made by another process (another app instance, a script, SQL by hand): at most
 *   `SESSION_RECHECK_MS` (default 5000 ms) plus the time of one request, after which the check
 *   is done again against the database.
 *
 * `SESSION_RECHECK_MS=0` turns remembering off (every request asks the database, as before).
 */
import type { Knex } from 'knex';
import type { SessionOrganisation, SessionUser } from '../session-user';

export const defaultRecheckMs = 5000;
/** Bounds the memory a flood of distinct valid cookies can take; the oldest entries go first. */
const maxEntries = 10_000;

export function recheckMs(): number {
  const configured = Number(process.env.SESSION_RECHECK_MS);
  return Number.isFinite(configured) && configured >= 0 ? Math.min(configured, 60_000) : defaultRecheckMs;
}

/** A Map that drops its oldest entry when full (insertion order; a hit is not moved). */
class Bounded<V> extends Map<string, V> {
  override set(key: string, value: V): this {
    if (!this.has(key) && this.size >= maxEntries) {
      const oldest = this.keys().next();
      if (!oldest.done) this.delete(oldest.value);
    }
    return super.set(key, value);
  }
}

interface Held {
  userId: string;
  sessionVersion: number;
  user: SessionUser;
  organisation: SessionOrganisation;
  until: number;
}

/** Session checks that held, by session id. */
const held = new Bounded<Held>();
/** Decoded session cookies by their exact text; decoding depends on nothing but that and the secret. */
const decoded = new Bounded<{ value: unknown; expiresAt: number }>();
/** Moves on whenever checks are forgotten, so a check that started before cannot be kept after. */
let epoch = 0;

export function sessionCheckEpoch(): number {
  return epoch;
}

/** The remembered answer for this session, if it is fresh and was for this user and version. */
export function heldSession(
  sessionId: string,
  userId: string,
  sessionVersion: number,
): { user: SessionUser; organisation: SessionOrganisation } | undefined {
  const entry = held.get(sessionId);
  if (!entry) return undefined;
  if (entry.until <= Date.now() || entry.userId !== userId || entry.sessionVersion !== sessionVersion) {
    held.delete(sessionId);
    return undefined;
  }
  // Copies, so a request that changed its locals could not change another request's.
  return { user: { ...entry.user }, organisation: { ...entry.organisation } };
}

/** Remembers that the session held, unless checks were forgotten since `startedEpoch`. */
export function rememberSession(
  sessionId: string,
  userId: string,
  sessionVersion: number,
  found: { user: SessionUser; organisation: SessionOrganisation },
  startedEpoch: number,
): void {
  const ttl = recheckMs();
  if (ttl === 0 || startedEpoch !== epoch) return;
  held.set(sessionId, {
    userId,
    sessionVersion,
    user: { ...found.user },
    organisation: { ...found.organisation },
    until: Date.now() + ttl,
  });
}

/** A cookie decoded before, while its token has not expired. */
export function decodedCookie<T>(cookieText: string): T | undefined {
  const entry = decoded.get(cookieText);
  if (!entry) return undefined;
  if (entry.expiresAt <= Date.now()) {
    decoded.delete(cookieText);
    return undefined;
  }
  return entry.value as T;
}

export function rememberDecodedCookie(cookieText: string, value: unknown, expiresAt: Date): void {
  if (recheckMs() === 0) return;
  decoded.set(cookieText, { value, expiresAt: expiresAt.getTime() });
}

/** Forgets every remembered session check (decoded cookies stay: they do not depend on the database). */
export function forgetSessions(): void {
  epoch++;
  held.clear();
}

/**
 * Statements that can end or change a session: a write to one of these tables. Anything that
 * matches by mistake only costs a forgotten cache, so the pattern errs on the wide side.
 */
const sessionWrite =
  /\b(?:update|insert\s+into|delete\s+from|truncate(?:\s+table)?)\s+(?:only\s+)?(?:"?public"?\.)?"?(?:users|organisations|revoked_sessions)\b/i;
const transactionEnd = /^\s*(?:commit|rollback)\b(?!\s+to\b)/i;

export function isSessionWrite(sql: string): boolean {
  return sessionWrite.test(sql);
}

interface QueryEvent {
  sql?: string;
  __knexUid?: string;
  __knexTxId?: string;
}

/**
 * Makes every write of this process that can change a session forget the remembered checks.
 * Called once on the process's Knex instance (see db.ts).
 */
export function watchSessionWrites<K extends Knex>(knex: K): K {
  /** Connections inside a transaction that wrote session state and has not ended yet. */
  const open = new Set<string>();
  const connection = (q: QueryEvent) => q.__knexUid ?? '';
  knex.on('query', (q: QueryEvent) => {
    if (!q.sql || !isSessionWrite(q.sql)) return;
    forgetSessions();
    if (q.__knexTxId) open.add(connection(q));
  });
  const done = (q: QueryEvent) => {
    if (!q?.sql) return;
    if (isSessionWrite(q.sql)) forgetSessions();
    else if (transactionEnd.test(q.sql) && open.delete(connection(q))) forgetSessions();
  };
  knex.on('query-response', (_response: unknown, q: QueryEvent) => done(q));
  knex.on('query-error', (_error: unknown, q: QueryEvent) => done(q));
  return knex;
}
