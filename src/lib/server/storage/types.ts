/** The storage contract every driver meets (see index.ts). */
import type { Readable } from 'node:stream';

export interface StoredFile {
  /** SHA-256 of the bytes, lower-case hex: also the key. */
  key: string;
  size: number;
  contentType: string;
  /** False when the same bytes were already stored. */
  created: boolean;
}

export interface FileStorage {
  readonly driver: 'disk' | 's3';
  /** Stores the bytes under their SHA-256; idempotent. */
  put(bytes: Uint8Array, contentType: string): Promise<StoredFile>;
  /** The bytes under `key`, or null when nothing is stored there. Verifies the hash on read. */
  get(key: string): Promise<Buffer | null>;
  exists(key: string): Promise<boolean>;
  /** A stream of the bytes, or null when nothing is stored there (not re-hashed: use get to verify). */
  stream(key: string): Promise<Readable | null>;
}
