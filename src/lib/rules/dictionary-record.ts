/**
 * A zod record that hands back a dictionary (a null-prototype object) instead of a plain one.
 *
 * Why: answers, choices and measurements are keyed by question, and every input carries its own
 * subset of keys in its own order. Built into a plain `{}`, each new subset makes V8 create a
 * fresh chain of hidden classes, which measured as the dearest part of parsing an assessment
 * (compiled parse of the bench's generated inputs, interleaved in one process on the CI kind:
 * 37 µs with z.record, 14 µs with this). A null-prototype object is a hash table from the start.
 * It also means a key such as `toString` reads nothing rather than an inherited function.
 *
 * Validity and errors are zod's own: each value is parsed with the value schema (compiled), each
 * key with the key schema, and when anything is wrong the ordinary `z.record(key, value)` parses
 * the input instead, so the issues, their paths and messages are exactly those of `z.record`.
 * Members are added in sorted key order, so the native JSON.stringify writes them canonically
 * (the key schemas used here check keys; they do not rename them, so input order is output order).
 */
import { z } from 'zod';

const isPlainRecord = (input: unknown): input is Record<string, unknown> => {
  if (input === null || typeof input !== 'object') return false;
  const prototype = Object.getPrototypeOf(input) as unknown;
  return prototype === Object.prototype || prototype === null;
};

/** Up to this many keys, an insertion sort beats the built-in sort (a record holds a few dozen answers). */
const SMALL_RECORD = 64;

/** The record's own keys in code-unit order, as the default sort and canonicalJson order them. */
function sortedKeys(record: object): string[] {
  const keys = Object.keys(record);
  if (keys.length > SMALL_RECORD) return keys.sort();
  for (let i = 1; i < keys.length; i++) {
    const key = keys[i]!;
    let j = i - 1;
    for (; j >= 0 && keys[j]! > key; j--) keys[j + 1] = keys[j]!;
    keys[j + 1] = key;
  }
  return keys;
}

/** Keys remembered per record schema (a key schema is pure, so a remembered answer stays right). */
const KNOWN_KEYS_LIMIT = 4096;

export function dictionaryRecord<K extends z.ZodType<string, string>, V extends z.ZodType>(key: K, value: V) {
  const ordinary = z.record(key, value);
  const parseKey = z.compile(key);
  const parseValue = z.compile(value);
  // Keys that passed the key schema, and what it made of them: the same question keys recur in every input.
  const knownKeys = new Map<string, z.output<K>>();
  return z.unknown().transform((input, ctx): Record<z.output<K>, z.output<V>> => {
    if (isPlainRecord(input)) {
      const out = Object.create(null) as Record<string, z.output<V>>;
      let valid = true;
      // Members go in sorted key order, as canonicalJson writes them (see canonicalObject in input.ts).
      for (const name of sortedKeys(input)) {
        // z.record leaves a `__proto__` member out; so does this.
        if (name === '__proto__') continue;
        let outKey = knownKeys.get(name);
        if (outKey === undefined) {
          const parsedKey = parseKey.safeParse(name);
          if (!parsedKey.success) {
            valid = false;
            break;
          }
          outKey = parsedKey.data;
          if (knownKeys.size < KNOWN_KEYS_LIMIT) knownKeys.set(name, outKey);
        }
        const parsedValue = parseValue.safeParse(input[name]);
        if (!parsedValue.success) {
          valid = false;
          break;
        }
        out[outKey] = parsedValue.data;
      }
      if (valid) return out;
    }
    const result = ordinary.safeParse(input);
    if (result.success) {
      const out = Object.create(null) as Record<string, z.output<V>>;
      for (const name of Object.keys(result.data).sort())
        out[name] = (result.data as Record<string, z.output<V>>)[name]!;
      return out;
    }
    for (const issue of result.error.issues) ctx.addIssue(issue as Parameters<typeof ctx.addIssue>[0]);
    return z.NEVER;
  });
}
