/**
 * A staff member changes their own password, proving the current one. Wrong current passwords
 * count as failed password sign-ins (the same throttle, so a borrowed session cannot be used to
 * guess). A change moves users.session_version on, which ends every other session of the
 * person; the caller re-issues this session's cookie with the new version.
 */
import type { PasswordChange } from '@/lib/api/users';
import { recordAudit } from '../audit';
import { db } from '../db';
import { ForbiddenError, InvalidInputError, RateLimitedError, SignInRequiredError } from '../errors';
import { hashPassword, verifyPassword } from '../passwords';
import { staffRoles, type SessionUser } from '../session-user';
import { checkThrottle, recordAttempt, waitInWords } from './throttle';

type Outcome =
  | { outcome: 'changed'; sessionVersion: number }
  | { outcome: 'wrong' }
  | { outcome: 'throttled'; retryAfterSeconds: number };

/**
 * Returns the new session_version; throws InvalidInputError for a wrong current password and
 * RateLimitedError (with the wait) when throttled.
 */
export async function changePassword(
  user: SessionUser,
  input: PasswordChange,
  ip: string | null,
): Promise<number> {
  if (!staffRoles.includes(user.role)) throw new ForbiddenError('Only staff sign in with a password.');
  const newHash = await hashPassword(input.newPassword);
  const result = await db().transaction(async (trx): Promise<Outcome> => {
    // The same lock as a sign-in of this account, so guesses here and there are counted in order.
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`sign-in:${user.email.toLowerCase()}`]);
    const row = await trx('users').where({ id: user.id, active: true }).first('id', 'email', 'password_hash');
    if (!row) throw new SignInRequiredError('Sign in to use this.');
    const throttle = await checkThrottle(trx, 'password', row.email, ip);
    if (throttle.throttled) return { outcome: 'throttled', retryAfterSeconds: throttle.retryAfterSeconds };
    const matches = await verifyPassword(row.password_hash, input.currentPassword);
    const audit = {
      organisationId: user.organisationId,
      actorUserId: user.id,
      actorLabel: user.email,
      entityType: 'user',
      entityId: user.id,
      ip,
    };
    if (!matches) {
      await recordAttempt(trx, 'password', row.email, ip, false);
      await recordAudit(trx, {
        ...audit,
        action: 'password.change_refused',
        detail: { reason: 'wrong_current_password' },
      });
      return { outcome: 'wrong' };
    }
    const [updated] = await trx('users')
      .where({ id: user.id })
      .update({
        password_hash: newHash,
        session_version: trx.raw('session_version + 1'),
        updated_at: trx.fn.now(),
      })
      .returning('session_version');
    await recordAudit(trx, { ...audit, action: 'password.changed', detail: { otherSessionsEnded: true } });
    return { outcome: 'changed', sessionVersion: updated.session_version };
  });
  if (result.outcome === 'throttled') {
    throw new RateLimitedError(
      `Too many wrong passwords. Try again in ${waitInWords(result.retryAfterSeconds)}.`,
      result.retryAfterSeconds,
    );
  }
  if (result.outcome === 'wrong') {
    throw new InvalidInputError('The current password is not right.', [
      { field: 'currentPassword', message: 'is not right' },
    ]);
  }
  return result.sessionVersion;
}
