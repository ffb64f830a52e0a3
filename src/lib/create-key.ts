/**
 * Idempotency-Keys for the browser's creates (forms and the start of an assessment): the same
 * key while the same body is sent again to the same URL (a retry after a lost answer, a double
 * tap), a new one once that create has gone through.
 */
import { newClientRef } from './walk/entry';

const createKeys = new Map<string, string>();

export function createKey(url: string, bodyText: string): { key: string; done: () => void } {
  const slot = `${url}\n${bodyText}`;
  let key = createKeys.get(slot);
  if (!key) {
    key = newClientRef();
    createKeys.set(slot, key);
  }
  return { key, done: () => createKeys.delete(slot) };
}
