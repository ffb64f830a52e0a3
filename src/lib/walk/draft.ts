/**
 * A draft's three parts (answers, measurements, observations), and
 * how the walk-through applies its edits to them exactly as the server does: answers and
 * observations merge (RFC 7396), a measurement entry is replaced whole.
 */
import type { MeasurementValue, WalkDraft } from '@/lib/api/walk-through';
import { applyMergePatch, isObject, jsonEqual, valueAt, type Json, type JsonObject } from './merge-patch';

export const emptyDraft = (): WalkDraft => ({ answers: {}, measurements: {}, observations: {} });

export function asDraft(value: Json | undefined): WalkDraft {
  const doc = isObject(value) ? value : {};
  return {
    answers: (isObject(doc.answers) ? doc.answers : {}) as unknown as WalkDraft['answers'],
    measurements: (isObject(doc.measurements)
      ? doc.measurements
      : {}) as unknown as WalkDraft['measurements'],
    observations: isObject(doc.observations) ? doc.observations : {},
  };
}

export function toJson(draft: WalkDraft): JsonObject {
  return draft as unknown as JsonObject;
}

/** Applies one PATCH body's draft parts to a local copy, the way the server merges them. */
export function applyDraftPatch(draft: WalkDraft, patch: JsonObject): WalkDraft {
  const measurements = { ...draft.measurements };
  if (isObject(patch.measurements)) {
    for (const [key, entry] of Object.entries(patch.measurements)) {
      if (entry === null) delete measurements[key];
      else measurements[key] = entry as unknown as MeasurementValue;
    }
  }
  return {
    answers: (patch.answers === undefined
      ? draft.answers
      : applyMergePatch(draft.answers as unknown as Json, patch.answers)) as unknown as WalkDraft['answers'],
    measurements,
    observations: (patch.observations === undefined
      ? draft.observations
      : applyMergePatch(draft.observations, patch.observations)) as Record<string, Json>,
  };
}

/**
 * The units of change an edit is judged by when the server copy moved on: one answer, one
 * measurement, one site-context fact, or one whole observation part (lists are replaced whole).
 */
export function changedFields(patch: JsonObject): string[][] {
  const fields: string[][] = [];
  for (const doc of ['answers', 'measurements'] as const) {
    const part = patch[doc];
    if (isObject(part)) for (const key of Object.keys(part)) fields.push([doc, key]);
  }
  const observations = patch.observations;
  if (isObject(observations)) {
    for (const [part, value] of Object.entries(observations)) {
      if ((part === 'site' || part === 'hrnOverrides') && isObject(value))
        for (const key of Object.keys(value)) fields.push(['observations', part, key]);
      else fields.push(['observations', part]);
    }
  }
  return fields;
}

/** Removes one field from a patch (the auditor kept the server's value); empty parents go too. */
export function withoutField(patch: JsonObject, field: readonly string[]): JsonObject {
  const [head, ...rest] = field;
  if (head === undefined || !(head in patch)) return patch;
  const copy: JsonObject = { ...patch };
  const inner = copy[head];
  if (rest.length === 0 || !isObject(inner)) delete copy[head];
  else {
    const trimmed = withoutField(inner, rest);
    if (Object.keys(trimmed).length === 0) delete copy[head];
    else copy[head] = trimmed;
  }
  return copy;
}

export interface FieldConflict {
  field: string[];
  /** What the field held when this device last heard from the server. */
  base: Json | undefined;
  /** What the server holds now (another device or person changed it). */
  theirs: Json | undefined;
  /** What this device's unsent edits make it. */
  mine: Json | undefined;
}

/**
 * Compares unsent edits (in the order they were made) with a newer server copy. A field is in
 * conflict when the server's value moved away from the base this device started from and the
 * edits would set it to something else again; edits to fields nobody else touched can simply
 * be re-sent.
 */
export function findConflicts(
  base: WalkDraft,
  theirs: WalkDraft,
  pending: readonly JsonObject[],
): FieldConflict[] {
  const mineDocs = pending.reduce(applyDraftPatch, base);
  const seen = new Set<string>();
  const conflicts: FieldConflict[] = [];
  for (const field of pending.flatMap(changedFields)) {
    const id = field.join('.');
    if (seen.has(id)) continue;
    seen.add(id);
    const baseValue = valueAt(toJson(base), field);
    const theirValue = valueAt(toJson(theirs), field);
    const myValue = valueAt(toJson(mineDocs), field);
    if (!jsonEqual(baseValue, theirValue) && !jsonEqual(myValue, theirValue)) {
      conflicts.push({ field, base: baseValue, theirs: theirValue, mine: myValue });
    }
  }
  return conflicts;
}
