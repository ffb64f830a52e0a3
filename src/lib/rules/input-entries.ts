/**
 * The answers and measurements of one input, read once per scoring. Both are dictionaries keyed by
 * question (null-prototype objects, see dictionary-record.ts), where listing the keys and reading
 * each member cost far more than in an ordinary object; the input check, the facts and the input
 * hash each walked them again. Scoring reads them here once and hands the lists to all three.
 */
import type { AssessmentInput } from './input';

/** One record of an input: its own keys in the record's own order (as Object.keys lists them) and their values. */
export interface RecordEntries {
  readonly keys: readonly string[];
  readonly values: readonly unknown[];
}

export interface InputEntries {
  readonly answers: RecordEntries;
  readonly measurements: RecordEntries;
}

const NONE: RecordEntries = Object.freeze({ keys: Object.freeze([]), values: Object.freeze([]) });

/** A record's keys and values; an absent record (undefined or null) has none. */
export function entriesOf(record: object | null | undefined): RecordEntries {
  if (record === undefined || record === null) return NONE;
  const keys = Object.keys(record);
  const values = new Array<unknown>(keys.length);
  for (let i = 0; i < keys.length; i++) values[i] = (record as Record<string, unknown>)[keys[i]!];
  return { keys, values };
}

export function inputEntries(input: AssessmentInput): InputEntries {
  return { answers: entriesOf(input.answers), measurements: entriesOf(input.measurements) };
}

/**
 * The positions of `keys` in code-unit order (as the default sort and canonicalJson order keys):
 * null when they already are in that order, as a parsed input's are.
 */
export function sortedOrder(keys: readonly string[]): number[] | null {
  let sorted = true;
  for (let i = 1; i < keys.length && sorted; i++) sorted = keys[i - 1]! < keys[i]!;
  if (sorted) return null;
  const order = Array.from(keys, (_, i) => i);
  return order.sort((a, b) => (keys[a]! < keys[b]! ? -1 : keys[a]! > keys[b]! ? 1 : 0));
}
