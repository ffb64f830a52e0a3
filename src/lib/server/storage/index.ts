/**
 * File storage behind one small interface, content-addressed: a file's key is the SHA-256 of
 * its bytes, so the same bytes always land under the same key, writing twice is harmless and
 * a stored file can be checked against its name. Callers never build paths or object names.
 *
 * STORAGE_DRIVER=disk (default) keeps files under $LATCHWELL_DATA_DIR/files/<aa>/<sha256>;
 * STORAGE_DRIVER=s3 keeps them in an S3-compatible bucket (see s3.ts for its settings).
 */
import { createDiskStorage } from './disk';
import { createS3Storage, s3SettingsFromEnv } from './s3';
import type { FileStorage } from './types';

export type { FileStorage, StoredFile } from './types';
export { isStorageKey, sha256Hex, StorageKeyError } from './keys';

let instance: FileStorage | undefined;

/** The process's storage, chosen by STORAGE_DRIVER on first use. */
export function storage(): FileStorage {
  instance ??= storageFromEnv(process.env);
  return instance;
}

export function storageFromEnv(env: NodeJS.ProcessEnv): FileStorage {
  const driver = (env.STORAGE_DRIVER ?? 'disk').toLowerCase();
  if (driver === 'disk') return createDiskStorage(dataFilesDir(env));
  if (driver === 's3') return createS3Storage(s3SettingsFromEnv(env));
  throw new Error(`STORAGE_DRIVER must be "disk" or "s3", not "${env.STORAGE_DRIVER}"`);
}

/** The data folder: LATCHWELL_DATA_DIR, else `.data` under the working directory. */
export function dataDir(env: NodeJS.ProcessEnv = process.env): string {
  return env.LATCHWELL_DATA_DIR ?? `${process.cwd()}/.data`;
}

function dataFilesDir(env: NodeJS.ProcessEnv): string {
  return `${dataDir(env)}/files`;
}
