import { hash } from 'node:crypto';

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
  try {
    return write(value);
  } catch (error) {
    if (error instanceof TypeError)
      throw new TypeError(`canonicalJson: ${error.message} at ${pathOfProblem(value, '$') ?? '$'}`);
    throw error;
  }
}

/** A finite number as canonical JSON writes it (-0 as 0); a non-finite one is refused. */
export function writeNumber(value: number): string {
  if (!Number.isFinite(value)) throw new TypeError('non-finite number');
  return value === 0 ? '0' : String(value);
}

function write(value: unknown): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'string':
      return value.length <= SHORT_STRING ? quoted(value) : JSON.stringify(value);
    case 'boolean':
      return value ? 'true' : 'false';
    case 'number':
      if (!Number.isFinite(value)) throw new TypeError('non-finite number');
      return value === 0 ? '0' : String(value);
    case 'object':
      return Array.isArray(value) ? writeArray(value) : writeObject(value as Record<string, unknown>);
    default:
      throw new TypeError(`cannot write a ${typeof value}`);
  }
}

function writeArray(items: readonly unknown[]): string {
  let out = '[';
  for (let i = 0; i < items.length; i++) {
    const item = items[i];
    if (i > 0) out += ',';
    out += item === undefined || typeof item === 'function' ? 'null' : write(item);
  }
  return out + ']';
}

/** Up to this many keys an insertion sort beats the built-in sort. */
const SMALL_OBJECT = 32;

/** Strings up to this length are remembered quoted (keys, units, yes/no answers, outcomes recur constantly). */
const SHORT_STRING = 24;

/** Quoted keys and short values, remembered: the same few hundred recur in every input and result. */
const quotedKeys = new Map<string, string>();
const QUOTED_KEYS_LIMIT = 4096;

/** A string as canonical JSON writes it (short ones remembered). */
export function quoted(key: string): string {
  let q = quotedKeys.get(key);
  if (q === undefined) {
    q = JSON.stringify(key);
    if (quotedKeys.size < QUOTED_KEYS_LIMIT) quotedKeys.set(key, q);
  }
  return q;
}

function writeObject(record: Record<string, unknown>): string {
  const keys = Object.keys(record);
  if (keys.length > SMALL_OBJECT) keys.sort();
  else
    // An insertion sort (code-unit order, as the default sort): most objects here have a handful of keys.
    for (let i = 1; i < keys.length; i++) {
      const key = keys[i]!;
      let j = i - 1;
      for (; j >= 0 && keys[j]! > key; j--) keys[j + 1] = keys[j]!;
      keys[j + 1] = key;
    }
  let out = '{';
  let first = true;
  for (const key of keys) {
    const member = record[key];
    if (member === undefined) continue;
    if (!first) out += ',';
    out += quoted(key) + ':' + write(member);
    first = false;
  }
  return out + '}';
}

/** Finds where a value cannot be written, only once writing has failed (keeps the fast path free of path strings). */
function pathOfProblem(value: unknown, path: string): string | null {
  if (typeof value === 'number') return Number.isFinite(value) ? null : path;
  if (typeof value === 'bigint' || typeof value === 'symbol' || typeof value === 'function') return path;
  if (value && typeof value === 'object') {
    for (const [key, member] of Object.entries(value)) {
      if (member === undefined) continue;
      const found = pathOfProblem(member, Array.isArray(value) ? `${path}[${key}]` : `${path}.${key}`);
      if (found) return found;
    }
  }
  return null;
}

/** Hex SHA-256 of a string's UTF-8 bytes (one-shot `crypto.hash`, Node 20.12+: no Hash object per call, which cost more than the hashing). */
export function sha256Hex(text: string): string {
  return hash('sha256', text, 'hex');
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
