import { createHash } from 'node:crypto';
import type { z } from 'zod';

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
    if (error instanceof TypeError) throw new TypeError(`canonicalJson: ${error.message} at ${pathOfProblem(value, '$') ?? '$'}`);
    throw error;
  }
}

function write(value: unknown): string {
  if (value === null) return 'null';
  switch (typeof value) {
    case 'string':
      return value.length <= SHORT_STRING ? quoted(value) : JSON.stringify(value);
    case 'boolean':
      return value ? 'true' : 'false';
    case 'number':
      return writeNumber(value);
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

/** Strings up to this length are remembered quoted (keys, units, yes/no answers, outcomes recur constantly). */
const SHORT_STRING = 24;

/** Quoted keys and short values, remembered: the same few hundred recur in every input and result. */
const quotedKeys = new Map<string, string>();
const QUOTED_KEYS_LIMIT = 4096;

function quoted(key: string): string {
  let q = quotedKeys.get(key);
  if (q === undefined) {
    q = JSON.stringify(key);
    if (quotedKeys.size < QUOTED_KEYS_LIMIT) quotedKeys.set(key, q);
  }
  return q;
}

function writeObject(record: Record<string, unknown>): string {
  const keys = Object.keys(record);
  if (keys.length > 1) keys.sort();
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

/** Writes one value in canonical form, knowing its schema. */
export type CanonicalWriter = (value: unknown) => string;

/**
 * A canonical JSON writer specialised to a zod schema's shape: an object's keys are sorted
 * once, when the writer is made, instead of on every call (only records still sort their keys).
 * The output is exactly `canonicalJson(value)` for any value the schema parsed; a member the
 * schema does not declare is not written, so pass only values that came out of the schema
 * (strict objects refuse unknown members anyway). Anything the shape walk does not know
 * (unions of objects, lazy, transforms) is written by the generic writer.
 */
export function canonicalWriterFor(schema: z.ZodType): CanonicalWriter {
  const writer = writerOf(schema as unknown as SchemaNode);
  return (value) => {
    try {
      return writer(value);
    } catch (error) {
      if (error instanceof TypeError) throw new TypeError(`canonicalJson: ${error.message} at ${pathOfProblem(value, '$') ?? '$'}`);
      throw error;
    }
  };
}

/** The part of a zod 4 schema's definition the shape walk reads. */
interface SchemaNode {
  _zod: {
    def: {
      type: string;
      shape?: Record<string, SchemaNode>;
      valueType?: SchemaNode;
      element?: SchemaNode;
      innerType?: SchemaNode;
    };
  };
}

function writerOf(schema: SchemaNode): CanonicalWriter {
  const def = schema._zod.def;
  switch (def.type) {
    case 'optional':
    case 'nullable':
    case 'readonly':
      return writerOf(def.innerType!);
    case 'object': {
      const members = Object.keys(def.shape!)
        .sort()
        .map((key) => ({ key, prefix: quoted(key) + ':', write: writerOf(def.shape![key]!) }));
      return (value) => {
        if (value === null || typeof value !== 'object' || Array.isArray(value)) return write(value);
        const record = value as Record<string, unknown>;
        let out = '{';
        for (let i = 0; i < members.length; i++) {
          const member = members[i]!;
          const item = record[member.key];
          if (item === undefined) continue;
          out += (out.length === 1 ? '' : ',') + member.prefix + member.write(item);
        }
        return out + '}';
      };
    }
    case 'record': {
      const writeValue = writerOf(def.valueType!);
      return (value) => {
        if (value === null || typeof value !== 'object' || Array.isArray(value)) return write(value);
        const record = value as Record<string, unknown>;
        const keys = Object.keys(record);
        if (keys.length > 1) keys.sort();
        let out = '{';
        for (const key of keys) {
          const item = record[key];
          if (item === undefined) continue;
          out += (out.length === 1 ? '' : ',') + quoted(key) + ':' + writeValue(item);
        }
        return out + '}';
      };
    }
    case 'array': {
      const writeItem = writerOf(def.element!);
      return (value) => {
        if (!Array.isArray(value)) return write(value);
        let out = '[';
        for (let i = 0; i < value.length; i++) {
          const item: unknown = value[i];
          if (i > 0) out += ',';
          out += item === undefined || typeof item === 'function' ? 'null' : writeItem(item);
        }
        return out + ']';
      };
    }
    case 'number':
      return (value) => (typeof value === 'number' ? writeNumber(value) : write(value));
    case 'boolean':
      return (value) => (value === true ? 'true' : value === false ? 'false' : write(value));
    case 'enum': {
      // The few values an enum allows, quoted once.
      const known = new Map<unknown, string>();
      for (const option of Object.values((def as { entries?: Record<string, unknown> }).entries ?? {})) {
        if (typeof option === 'string') known.set(option, JSON.stringify(option));
      }
      return (value) => known.get(value) ?? write(value);
    }
    default:
      return write;
  }
}

function writeNumber(value: number): string {
  if (!Number.isFinite(value)) throw new TypeError('non-finite number');
  return value === 0 ? '0' : String(value);
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
