/**
 * The input hash a result carries (`inputSha256`): SHA-256 of the input's canonical JSON in its
 * record form, which ties a result to exactly what was scored.
 *
 * The record form is the input as results have always hashed it: the answers split by the
 * scored version's question types into `answers` (yes / no / na questions) and `choices`
 * (everything else, a key the version does not ask included). The engine now takes the one
 * stored answer map, but results signed before that carry hashes of this form, and the same
 * documents scored again must give the same result bytes, so the split is kept here, for the
 * hash only. Everything is written as canonicalJson writes it (keys sorted, undefined members
 * left out, -0 as 0); a unit test holds it to an independent writer from npm.
 *
 * Answers and measurements are most of an input, so their entries (`{ note?, value }` and
 * `{ canonical, note?, unit, value }`) are written by hand in canonical order; an entry with any
 * other member goes through the generic writer, so nothing is ever left out of the hash.
 */
import type { CompiledRuleset } from './compile';
import { canonicalJson, quoted, sha256Hex } from './hash';
import type { AssessmentInput } from './input';

/** The members after `answers`, `choices` and `entrapment`…`hrnOverrides`, in canonical (sorted) order. */
const BEFORE_MEASUREMENTS = ['entrapment', 'forceTests', 'hrnOverrides'] as const;
const AFTER_MEASUREMENTS = ['profile', 'site', 'swingGeometry'] as const;

/** The record's own keys in code-unit order (an insertion sort: a record holds a few dozen). */
function sortedKeys(record: object): string[] {
  const keys = Object.keys(record);
  if (keys.length > 64) return keys.sort();
  for (let i = 1; i < keys.length; i++) {
    const key = keys[i]!;
    let j = i - 1;
    for (; j >= 0 && keys[j]! > key; j--) keys[j + 1] = keys[j]!;
    keys[j + 1] = key;
  }
  return keys;
}

function countKeys(value: object): number {
  let n = 0;
  for (const key in value) if (Object.prototype.hasOwnProperty.call(value, key)) n++;
  return n;
}

function writeAnswer(entry: { value: string; note?: string }): string {
  const { value, note } = entry;
  if (typeof value !== 'string' || countKeys(entry) !== (note === undefined ? ('note' in entry ? 2 : 1) : 2))
    return canonicalJson(entry);
  if (note === undefined) return '{"value":' + quoted(value) + '}';
  if (typeof note !== 'string') return canonicalJson(entry);
  return '{"note":' + JSON.stringify(note) + ',"value":' + quoted(value) + '}';
}

/**
 * Measurements: each entry copied into an object literal with its members in canonical order
 * (`canonical`, `note`, `unit`, `value`), keys added in sorted order, and the whole written by the
 * native writer. An entry of any other shape, or with a number that is not finite, goes through
 * the generic writer instead, so nothing is ever left out of the hash or written as `null`.
 */
function writeMeasurements(measurements: Readonly<Record<string, unknown>>): string {
  const mirror: Record<string, unknown> = {};
  for (const key of sortedKeys(measurements)) {
    // A key an object literal would not keep in insertion order (an array index) or would not keep at all.
    const first = key.charCodeAt(0);
    if (key === '__proto__' || (first >= 48 && first <= 57)) return canonicalJson(measurements);
    const entry = measurements[key] as { value: number; unit: string; canonical: number; note?: string };
    if (entry === undefined) continue;
    const { value, unit, canonical, note } = entry;
    if (
      typeof value !== 'number' ||
      typeof canonical !== 'number' ||
      !Number.isFinite(value) ||
      !Number.isFinite(canonical) ||
      typeof unit !== 'string' ||
      (note !== undefined && typeof note !== 'string') ||
      countKeys(entry) !== (note === undefined && !('note' in entry) ? 3 : 4)
    )
      return canonicalJson(measurements);
    mirror[key] = { canonical, note, unit, value };
  }
  return JSON.stringify(mirror);
}

/**
 * A force trace's samples (thousands of `{ f, t }`): when every sample has exactly `f` then `t`
 * (the canonical order, which is also the order PostgreSQL's jsonb keeps them in) and finite
 * numbers, the native writer writes the canonical JSON; otherwise the generic writer does.
 */
function writeSamples(samples: readonly { t: number; f: number }[]): string {
  for (let i = 0; i < samples.length; i++) {
    const sample = samples[i] as Record<string, unknown> | null;
    if (typeof sample !== 'object' || sample === null) return canonicalJson(samples);
    let at = 0;
    for (const key in sample) {
      if (key !== (at === 0 ? 'f' : 't') || !Number.isFinite(sample[key])) return canonicalJson(samples);
      at++;
    }
    if (at !== 2) return canonicalJson(samples);
  }
  return JSON.stringify(samples);
}

/** Force tests by the generic writer, but their samples (most of an input that has them) by hand. */
function writeForceTests(tests: NonNullable<AssessmentInput['forceTests']>): string {
  let out = '[';
  for (let i = 0; i < tests.length; i++) {
    const test = tests[i]!;
    let written: string;
    // `samples` sorts after every other member of a force test but `summary` (refused beside samples).
    if (test && Array.isArray(test.samples) && test.samples.length > 0 && !('summary' in test)) {
      const { samples, ...rest } = test;
      const others = canonicalJson(rest);
      written =
        others.slice(0, -1) + (others.length > 2 ? ',' : '') + '"samples":' + writeSamples(samples) + '}';
    } else written = canonicalJson(test);
    out += i === 0 ? written : ',' + written;
  }
  return out + ']';
}

/**
 * The canonical JSON of the input's record form (see the module comment). `schemaOrdered`: the
 * input is what AssessmentInputSchema just built, every object's keys already in canonical order
 * (canonicalObject and dictionaryRecord in input.ts) and every number finite, so the native
 * writer's output is canonical for each member (a unit test holds the two equal).
 */
export function inputRecordJson(
  input: AssessmentInput,
  compiled: CompiledRuleset,
  schemaOrdered = false,
): string {
  try {
    return schemaOrdered ? writeOrdered(input, compiled) : write(input, compiled);
  } catch (error) {
    // Name where the problem is, from the top of the input (canonicalJson throws with the path).
    if (error instanceof TypeError) canonicalJson(input);
    throw error;
  }
}

function write(input: AssessmentInput, compiled: CompiledRuleset): string {
  let out = '{';
  const answers = input.answers;
  if (answers !== undefined) {
    let yesNo = '';
    let choices = '';
    const questions = compiled.questionByKey;
    for (const key of sortedKeys(answers)) {
      const entry = answers[key];
      if (entry === undefined) continue;
      const member = quoted(key) + ':' + writeAnswer(entry);
      if (questions.get(key)?.answerType === 'yes_no_na') yesNo += yesNo ? ',' + member : member;
      else choices += choices ? ',' + member : member;
    }
    out += '"answers":{' + yesNo + '},"choices":{' + choices + '}';
  }
  for (const name of BEFORE_MEASUREMENTS) {
    const member = input[name];
    if (member === undefined) continue;
    const written =
      name === 'forceTests' && Array.isArray(member)
        ? writeForceTests(member as NonNullable<AssessmentInput['forceTests']>)
        : canonicalJson(member);
    out += (out.length > 1 ? ',"' : '"') + name + '":' + written;
  }
  const measurements = input.measurements;
  if (measurements !== undefined)
    out += (out.length > 1 ? ',' : '') + '"measurements":' + writeMeasurements(measurements);
  for (const name of AFTER_MEASUREMENTS) {
    const member = input[name];
    if (member === undefined) continue;
    out += (out.length > 1 ? ',"' : '"') + name + '":' + canonicalJson(member);
  }
  return out + '}';
}

/** The record form of an input the schema built (see inputRecordJson): the native writer, member by member. */
function writeOrdered(input: AssessmentInput, compiled: CompiledRuleset): string {
  let out = '{';
  const answers = input.answers;
  if (answers !== undefined) {
    let yesNo = '';
    let choices = '';
    const questions = compiled.questionByKey;
    for (const key in answers) {
      const member = quoted(key) + ':' + JSON.stringify(answers[key]);
      if (questions.get(key)?.answerType === 'yes_no_na') yesNo += yesNo ? ',' + member : member;
      else choices += choices ? ',' + member : member;
    }
    out += '"answers":{' + yesNo + '},"choices":{' + choices + '}';
  }
  for (const name of ORDERED_REST) {
    const member = input[name];
    if (member === undefined) continue;
    out += (out.length > 1 ? ',"' : '"') + name + '":' + JSON.stringify(member);
  }
  return out + '}';
}

const ORDERED_REST = [...BEFORE_MEASUREMENTS, 'measurements', ...AFTER_MEASUREMENTS] as const;

/** SHA-256 of the input's record form. */
export function inputSha256(
  input: AssessmentInput,
  compiled: CompiledRuleset,
  schemaOrdered = false,
): string {
  return sha256Hex(inputRecordJson(input, compiled, schemaOrdered));
}
