/**
 * Sign-in throttling, counted in the database so every app instance agrees. A sliding
 * window: once an account (or an address) has N counted events in the last 15 minutes, it
 * waits until the oldest of those N leaves the window.
 *
 * - Password sign-ins count failures per (account, address) pair and per address. A stranger's
 *   guesses therefore pause the stranger, not the owner signing in from elsewhere. A success
 *   resets its pair's count (not the address's, so signing in to one's own account cannot
 *   unlock guessing at others).
 * - Link requests and staff password-reset requests (`reset_request`) count every request per
 *   (account, address) pair, and more loosely per account from any address: a stranger asking
 *   again and again for someone's link pauses the stranger, while nobody can flood an inbox.
 * - Public report checks (`verify`) count every check, per address only.
 */
import type { Knex } from 'knex';

export type AttemptKind = 'password' | 'link_request' | 'link' | 'verify' | 'reset_request';

export interface ThrottleLimits {
  windowMinutes: number;
  /** Per account; for passwords and link requests per account and address together. */
  perAccount: number;
  /** Per account from any address, where `perAccount` counts pairs (link requests). */
  perAccountAnyAddress?: number;
  perAddress: number;
}

/**
 * Common practice (OWASP authentication cheat sheet: slow down after a few failures), no fixed
 * standard. For passwords `perAccount` counts per account and address together.
 */
export const passwordLimits: ThrottleLimits = { windowMinutes: 15, perAccount: 5, perAddress: 20 };
/** Common practice, no source: 5 mails from one place, 15 to one inbox, per quarter hour. */
export const linkRequestLimits: ThrottleLimits = {
  windowMinutes: 15,
  perAccount: 5,
  perAccountAnyAddress: 15,
  perAddress: 20,
};
/**
 * Public report checks (no account): generous for an office checking a batch of reports, tight
 * enough that nobody can keep the server hashing 30 MB uploads. Common practice, no source.
 */
export const verifyLimits: ThrottleLimits = {
  windowMinutes: 15,
  perAccount: 0 /* no account: never checked */,
  perAddress: 60,
};

const limitsOf = (kind: AttemptKind): ThrottleLimits =>
  kind === 'password' ? passwordLimits : kind === 'verify' ? verifyLimits : linkRequestLimits;

export type ThrottleVerdict =
  { throttled: false } | { throttled: true; scope: 'account' | 'address'; retryAfterSeconds: number };

/** When the Nth most recent counted event leaves the window, or null when fewer than N. */
async function freedAt(
  knex: Knex,
  query: Knex.QueryBuilder,
  limit: number,
  windowMinutes: number,
): Promise<Date | null> {
  const row = await query
    .clone()
    .where('created_at', '>', knex.raw(`now() - make_interval(mins => ?)`, [windowMinutes]))
    .orderBy('created_at', 'desc')
    .offset(limit - 1)
    .first('created_at');
  if (!row) return null;
  return new Date(new Date(row.created_at).getTime() + windowMinutes * 60_000);
}

function verdict(scope: 'account' | 'address', until: Date | null): ThrottleVerdict | null {
  if (!until) return null;
  return {
    throttled: true,
    scope,
    retryAfterSeconds: Math.max(1, Math.ceil((until.getTime() - Date.now()) / 1000)),
  };
}

export async function checkThrottle(
  knex: Knex,
  kind: AttemptKind,
  email: string | null,
  ip: string | null,
): Promise<ThrottleVerdict> {
  const limits = limitsOf(kind);
  if (email && limits.perAccount > 0) {
    const account = knex('sign_in_attempts').where({ kind, email });
    if (limits.perAccountAnyAddress) {
      const anywhere = verdict(
        'account',
        await freedAt(knex, account, limits.perAccountAnyAddress, limits.windowMinutes),
      );
      if (anywhere) return anywhere;
      account.where((q) => (ip ? q.where('ip', ip) : q.whereNull('ip')));
    }
    if (kind === 'password') {
      // Counted per account *and* address: a stranger's wrong guesses pause only the stranger,
      // never the owner signing in from elsewhere. A success resets that pair's count.
      const sameAddress = (q: Knex.QueryBuilder) => (ip ? q.where('ip', ip) : q.whereNull('ip'));
      sameAddress(account);
      const lastSuccess = sameAddress(
        knex('sign_in_attempts').where({ kind: 'password', email, succeeded: true }),
      ).max('created_at');
      account
        .where('succeeded', false)
        .andWhere('created_at', '>', knex.raw(`coalesce((?), '-infinity')`, [lastSuccess]));
    }
    const hit = verdict('account', await freedAt(knex, account, limits.perAccount, limits.windowMinutes));
    if (hit) return hit;
  }
  if (ip) {
    const address = knex('sign_in_attempts').where({ kind, ip });
    if (kind === 'password') address.where('succeeded', false);
    const hit = verdict('address', await freedAt(knex, address, limits.perAddress, limits.windowMinutes));
    if (hit) return hit;
  }
  return { throttled: false };
}

export async function recordAttempt(
  knex: Knex,
  kind: AttemptKind,
  email: string | null,
  ip: string | null,
  succeeded: boolean,
): Promise<void> {
  await knex('sign_in_attempts').insert({ kind, email, ip, succeeded });
}

/**
 * For kinds counted per address only (`verify`): admits one more event from this address, or says
 * how long to wait. Checked and written in one transaction under a lock on the address, and the
 * address's rows of this kind older than the window are dropped as the new one is written.
 */
export async function admitFromAddress(knex: Knex, kind: AttemptKind, ip: string): Promise<ThrottleVerdict> {
  return knex.transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`${kind}:${ip}`]);
    const verdict = await checkThrottle(trx, kind, null, ip);
    if (verdict.throttled) return verdict;
    await trx('sign_in_attempts')
      .where({ kind, ip })
      .andWhere(
        'created_at',
        '<',
        trx.raw(`now() - make_interval(mins => ?)`, [limitsOf(kind).windowMinutes]),
      )
      .del();
    await recordAttempt(trx, kind, null, ip, true);
    return verdict;
  });
}

/** "about 12 minutes" for a message a person reads. */
export function waitInWords(seconds: number): string {
  const minutes = Math.ceil(seconds / 60);
  return minutes <= 1 ? 'about a minute' : `about ${minutes} minutes`;
}
