/**
 * JSON Merge Patch (RFC 7396): how a draft's documents are saved in pieces. Objects merge key
 * by key, a null removes the key, anything else (arrays included) replaces what was there.
 * Applied by the `json-merge-patch` package, which changes the target in place: the target is
 * copied first, so this returns a new value and never changes its arguments. At a key named
 * `__proto__`, `constructor` or `prototype` the package stops applying that object's remaining
 * keys (no prototype is ever set from a patch); no document of ours uses such a key.
 */
import jsonMergePatch from 'json-merge-patch';

export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

export function applyMergePatch(target: unknown, patch: unknown): unknown {
  return jsonMergePatch.apply(target === undefined ? undefined : structuredClone(target), patch);
}
