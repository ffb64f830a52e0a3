import { createHash } from 'node:crypto';

/**
 * Canonical JSON: object keys sorted by code unit, no whitespace, `-0` written as `0`,
 * `undefined` members dropped (as JSON.stringify does). Scoring results, ruleset contents and
 * inputs are hashed through this so that the same content always gives the same bytes, no
 * matter the key order it was built or stored in (PostgreSQL jsonb reorders keys).
 *
 * Non-finite numbers are refused rather than silently written as `null`: a NaN in a result is
 * a bug upstream and must not be signed into a report.
 */
export function canonicalJson(value: unknown): string {
  return write(value, '$');
}

function write(value: unknown, path: string): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'string':
      return JSON.stringify(value);
    case 'boolean':
      return value ? 'true' : 'false';
    case 'number':
      if (!Number.isFinite(value)) throw new TypeError(`canonicalJson: non-finite number at ${path}`);
      return Object.is(value, -0) ? '0' : JSON.stringify(value);
    case 'object':
      return Array.isArray(value) ? writeArray(value, path) : writeObject(value as Record<string, unknown>, path);
    default:
      throw new TypeError(`canonicalJson: cannot write a ${typeof value} at ${path}`);
  }
}

function writeArray(items: readonly unknown[], path: string): string {
  const parts: string[] = [];
  for (let i = 0; i < items.length; i++) {
    const item = items[i];
    parts.push(item === undefined || typeof item === 'function' ? 'null' : write(item, `${path}[${i}]`));
  }
  return `[${parts.join(',')}]`;
}

function writeObject(record: Record<string, unknown>, path: string): string {
  const keys = Object.keys(record).sort();
  const parts: string[] = [];
  for (const key of keys) {
    const member = record[key];
    if (member === undefined) continue;
    parts.push(`${JSON.stringify(key)}:${write(member, `${path}.${key}`)}`);
  }
  return `{${parts.join(',')}}`;
}

/** Hex SHA-256 of a string's UTF-8 bytes. */
export function sha256Hex(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** SHA-256 of any JSON value's canonical form: the identity of a ruleset version or an input. */
export function contentSha256(value: unknown): string {
  return sha256Hex(canonicalJson(value));
}

/**
 * SHA-256 of a scoring result's canonical JSON. Stored beside the result so the report, the
 * signature record and the archive can prove which result they show.
 */
export function resultSha256(result: unknown): string {
  return contentSha256(result);
}
