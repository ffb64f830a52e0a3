/**
 * What auth core's callbacks cannot see on their own: the caller's address and user agent,
 * and (written back by `authorize`) whether the attempt was throttled. The auth endpoint runs
 * auth core inside `signInContext.run(...)`; the callbacks read and write it.
 */
import { AsyncLocalStorage } from 'node:async_hooks';

export interface SignInContext {
  ip: string | null;
  userAgent: string | null;
  /** Set by a throttled attempt: seconds until the caller may try again. */
  retryAfterSeconds?: number;
}

export const signInContext = new AsyncLocalStorage<SignInContext>();

export function currentSignInContext(): SignInContext {
  return signInContext.getStore() ?? { ip: null, userAgent: null };
}
