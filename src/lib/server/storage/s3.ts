/**
 * S3-compatible driver (AWS S3, MinIO, Ceph, R2 …) through @aws-sdk/client-s3. Objects are
 * named <prefix><aa>/<sha256>; a PUT of bytes already there is skipped after a HEAD.
 *
 * Settings: S3_BUCKET (required), S3_ENDPOINT (for non-AWS stores), S3_REGION (default
 * us-east-1), S3_ACCESS_KEY_ID / S3_SECRET_ACCESS_KEY (else the SDK's usual credential
 * chain), S3_FORCE_PATH_STYLE (default true when S3_ENDPOINT is set), S3_PREFIX.
 */
import { GetObjectCommand, HeadObjectCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { Readable } from 'node:stream';
import { assertStorageKey, sha256Hex, shardedPath } from './keys';
import type { FileStorage, StoredFile } from './types';

export interface S3Settings {
  bucket: string;
  endpoint?: string;
  region: string;
  accessKeyId?: string;
  secretAccessKey?: string;
  forcePathStyle: boolean;
  prefix: string;
}

export function s3SettingsFromEnv(env: NodeJS.ProcessEnv): S3Settings {
  if (!env.S3_BUCKET) throw new Error('STORAGE_DRIVER=s3 needs S3_BUCKET');
  const prefix = env.S3_PREFIX ?? '';
  if (prefix && !/^[A-Za-z0-9._-]+(\/[A-Za-z0-9._-]+)*\/$/.test(prefix))
    throw new Error('S3_PREFIX must be folder names ending in "/"');
  return {
    bucket: env.S3_BUCKET,
    endpoint: env.S3_ENDPOINT || undefined,
    region: env.S3_REGION ?? 'us-east-1',
    accessKeyId: env.S3_ACCESS_KEY_ID || undefined,
    secretAccessKey: env.S3_SECRET_ACCESS_KEY || undefined,
    forcePathStyle: env.S3_FORCE_PATH_STYLE ? env.S3_FORCE_PATH_STYLE === 'true' : Boolean(env.S3_ENDPOINT),
    prefix,
  };
}

export function createS3Storage(settings: S3Settings): FileStorage {
  const client = new S3Client({
    region: settings.region,
    endpoint: settings.endpoint,
    forcePathStyle: settings.forcePathStyle,
    credentials:
      settings.accessKeyId && settings.secretAccessKey
        ? { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey }
        : undefined,
    // Many S3-compatible stores do not understand the SDK's default CRC32 trailers.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
  const objectKey = (key: string) => `${settings.prefix}${shardedPath(assertStorageKey(key))}`;

  async function head(key: string): Promise<boolean> {
    try {
      await client.send(new HeadObjectCommand({ Bucket: settings.bucket, Key: objectKey(key) }));
      return true;
    } catch (error) {
      if (isNotFound(error)) return false;
      throw error;
    }
  }

  async function open(key: string): Promise<Readable | null> {
    try {
      const out = await client.send(new GetObjectCommand({ Bucket: settings.bucket, Key: objectKey(key) }));
      return out.Body as Readable;
    } catch (error) {
      if (isNotFound(error)) return null;
      throw error;
    }
  }

  return {
    driver: 's3',
    async put(bytes, contentType): Promise<StoredFile> {
      const key = sha256Hex(bytes);
      if (await head(key)) return { key, size: bytes.byteLength, contentType, created: false };
      await client.send(
        new PutObjectCommand({
          Bucket: settings.bucket,
          Key: objectKey(key),
          Body: bytes,
          ContentType: contentType,
          ContentLength: bytes.byteLength,
          Metadata: { sha256: key },
        }),
      );
      return { key, size: bytes.byteLength, contentType, created: true };
    },
    async get(key) {
      const body = await open(key);
      if (!body) return null;
      const chunks: Buffer[] = [];
      for await (const chunk of body) chunks.push(Buffer.from(chunk as Uint8Array));
      const bytes = Buffer.concat(chunks);
      if (sha256Hex(bytes) !== key) throw new Error(`stored object ${key} does not match its hash`);
      return bytes;
    },
    exists: head,
    stream: open,
  };
}

function isNotFound(error: unknown): boolean {
  const e = error as { name?: string; $metadata?: { httpStatusCode?: number } };
  return e?.name === 'NotFound' || e?.name === 'NoSuchKey' || e?.$metadata?.httpStatusCode === 404;
}
