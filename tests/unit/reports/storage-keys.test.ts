/** Storage keys are SHA-256 hex only, so no caller input can name a path. */
import { describe, expect, it } from 'vitest';
import { isStorageKey, sha256Hex } from '../../../src/lib/server/storage';
import { shardedPath } from '../../../src/lib/server/storage/keys';

describe('storage keys', () => {
  it('accepts lower-case SHA-256 hex and shards it by its first two characters', () => {
    const key = sha256Hex(Buffer.from('gate'));
    expect(isStorageKey(key)).toBe(true);
    expect(shardedPath(key)).toBe(`${key.slice(0, 2)}/${key}`);
  });

  it('refuses traversal, separators, upper case and wrong lengths', () => {
    for (const bad of [
      '..',
      '../x',
      'a/b',
      'A'.repeat(64),
      'a'.repeat(63),
      'a'.repeat(65),
      `${'a'.repeat(32)}/${'a'.repeat(31)}`,
      null,
      42,
    ]) {
      expect(isStorageKey(bad)).toBe(false);
    }
    expect(() => shardedPath('../etc/passwd')).toThrow(/not a storage key/);
  });
});
