/**
 * Disk driver: files under <root>/<aa>/<sha256>, written to a temporary name in the same
 * folder and renamed into place, so a reader never sees half a file and two writers of the
 * same bytes both succeed. Files are made read-only once written.
 */
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import type { Readable } from 'node:stream';
import { assertStorageKey, sha256Hex, shardedPath } from './keys';
import type { FileStorage, StoredFile } from './types';

export function createDiskStorage(root: string): FileStorage {
  const absoluteRoot = path.resolve(root);
  const fileFor = (key: string) => {
    const file = path.join(absoluteRoot, shardedPath(assertStorageKey(key)));
    // Belt and braces: the key pattern already rules out anything but hex.
    if (!file.startsWith(absoluteRoot + path.sep)) throw new Error('storage path escaped its root');
    return file;
  };

  return {
    driver: 'disk',
    async put(bytes, contentType): Promise<StoredFile> {
      const key = sha256Hex(bytes);
      const file = fileFor(key);
      if (await exists(file)) return { key, size: bytes.byteLength, contentType, created: false };
      await fs.mkdir(path.dirname(file), { recursive: true });
      const temp = `${file}.${randomBytes(6).toString('hex')}.tmp`;
      await fs.writeFile(temp, bytes, { mode: 0o444 });
      await fs.rename(temp, file);
      return { key, size: bytes.byteLength, contentType, created: true };
    },
    async get(key) {
      const bytes = await fs.readFile(fileFor(key)).catch(notFoundAsNull);
      if (bytes && sha256Hex(bytes) !== key) throw new Error(`stored file ${key} does not match its hash`);
      return bytes;
    },
    async exists(key) {
      return exists(fileFor(key));
    },
    async stream(key): Promise<Readable | null> {
      const file = fileFor(key);
      if (!(await exists(file))) return null;
      return createReadStream(file);
    },
  };
}

async function exists(file: string): Promise<boolean> {
  return fs.stat(file).then(
    (s) => s.isFile(),
    () => false,
  );
}

function notFoundAsNull(error: NodeJS.ErrnoException): null {
  if (error.code === 'ENOENT') return null;
  throw error;
}
