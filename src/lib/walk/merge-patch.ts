/**
 * What the walk-through does with JSON merge patches (RFC 7396; applying one is
 * `@/lib/merge-patch`, shared with the server): combine queued edits, list what an edit
 * touches, and compare values, so edits can be folded, replayed in order and checked for
 * conflicts with a newer server copy.
 */
import { applyMergePatch as applyAny } from '@/lib/merge-patch';

export type Json = null | boolean | number | string | Json[] | { [key: string]: Json };
export type JsonObject = { [key: string]: Json };

export function isObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** The document after applying `patch`; the inputs are not changed. */
export function applyMergePatch(target: Json | undefined, patch: Json): Json {
  return applyAny(target, patch) as Json;
}

/**
 * One patch with the effect of applying `first` then `second`, or null when no single merge
 * patch has that effect (an object in `second` landing on a key `first` removed or set to a
 * non-object: applied in order it starts from nothing, merged at once it would merge with
 * what the server holds). Callers then send the two separately.
 */
export function composeMergePatches(first: JsonObject, second: JsonObject): JsonObject | null {
  const result: JsonObject = { ...first };
  for (const [key, value] of Object.entries(second)) {
    const earlier = result[key];
    if (isObject(value) && isObject(earlier)) {
      const inner = composeMergePatches(earlier, value);
      if (inner === null) return null;
      result[key] = inner;
    } else if (isObject(value) && earlier !== undefined) return null;
    else result[key] = value;
  }
  return result;
}

/** Paths (as arrays of keys) of every leaf a patch sets or removes: what it would change. */
export function patchLeaves(patch: JsonObject, prefix: string[] = []): string[][] {
  const leaves: string[][] = [];
  for (const [key, value] of Object.entries(patch)) {
    const path = [...prefix, key];
    if (isObject(value) && Object.keys(value).length > 0) leaves.push(...patchLeaves(value, path));
    else leaves.push(path);
  }
  return leaves;
}

/** The value at a path, or undefined. */
export function valueAt(document: Json | undefined, path: readonly string[]): Json | undefined {
  let current: Json | undefined = document;
  for (const key of path) {
    if (!isObject(current)) return undefined;
    current = current[key];
  }
  return current;
}

/** A patch that sets exactly one path (intermediate objects created). */
export function patchAt(path: readonly string[], value: Json): JsonObject {
  if (path.length === 0) throw new RangeError('a patch needs a path');
  let patch: Json = value;
  for (let i = path.length - 1; i >= 0; i -= 1) patch = { [path[i] as string]: patch };
  return patch as JsonObject;
}

/** Structural equality of two JSON values (key order ignored). */
export function jsonEqual(a: Json | undefined, b: Json | undefined): boolean {
  if (a === b) return true;
  if (a === undefined || b === undefined || a === null || b === null) return false;
  if (Array.isArray(a) || Array.isArray(b)) {
    return (
      Array.isArray(a) &&
      Array.isArray(b) &&
      a.length === b.length &&
      a.every((item, i) => jsonEqual(item, b[i]))
    );
  }
  if (isObject(a) && isObject(b)) {
    const keys = Object.keys(a);
    return keys.length === Object.keys(b).length && keys.every((key) => jsonEqual(a[key], b[key]));
  }
  return false;
}
