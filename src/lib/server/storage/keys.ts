/**
 * Keys are SHA-256 digests in lower-case hex and nothing else, checked before any driver
 * touches a path or an object name: `../`, slashes, NUL or upper-case never get through.
 */
import { createHash } from 'node:crypto';

const keyPattern = /^[0-9a-f]{64}$/;

export class StorageKeyError extends Error {
  constructor(key: unknown) {
    super(`not a storage key (SHA-256 hex expected): ${JSON.stringify(String(key).slice(0, 80))}`);
  }
}

export function isStorageKey(key: unknown): key is string {
  return typeof key === 'string' && keyPattern.test(key);
}

export function assertStorageKey(key: unknown): string {
  if (!isStorageKey(key)) throw new StorageKeyError(key);
  return key;
}

export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** `ab/ab12…`: two hex characters of fan-out keep any one folder small. */
export function shardedPath(key: string): string {
  assertStorageKey(key);
  return `${key.slice(0, 2)}/${key}`;
}
