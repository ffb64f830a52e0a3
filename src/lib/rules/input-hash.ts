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
 * left out, -0 as 0, a non-finite number refused); unit tests hold it to an independent writer
 * from npm over thousands of generated inputs, odd shapes included.
 *
 * Speed (the hash was a third of scoring an assessment): every object of the input has a known
 * shape, so each is written by a writer that knows its members — each member's `"key":` written
 * once per process (question keys once per version), each value by its type — and not by the
 * generic writer, which looked up every key and short string in a cache and recursed. The
 * members are still the object's own keys in sorted order (a member the schema does not know
 * is written by the generic writer in its place), so the bytes are canonical JSON whatever the
 * object holds. Strings of plain printable ASCII are quoted directly; any other goes through
 * JSON.stringify, as canonicalJson writes it.
 */
import type { CompiledRuleset } from './compile';
import { canonicalJson, sha256Hex } from './hash';
import type { AssessmentInput } from './input';
import { inputEntries, sortedOrder, type InputEntries, type RecordEntries } from './input-entries';

type Writer = (value: unknown) => string;

/** One member of a known object: its key, `"key":` ready written, and how its value is written. */
interface Member {
  readonly key: string;
  readonly prefix: string;
  readonly write: Writer;
}

/** A string as JSON.stringify writes it: printable ASCII without `"` or `\` needs no escaping. */
function str(value: string): string {
  for (let i = 0; i < value.length; i++) {
    const c = value.charCodeAt(i);
    if (c < 0x20 || c > 0x7e || c === 0x22 || c === 0x5c) return JSON.stringify(value);
  }
  return '"' + value + '"';
}

/** A finite number as canonicalJson writes it (-0 as 0); anything else by the generic writer (which refuses NaN and Infinity). */
const num: Writer = (value) =>
  typeof value === 'number' && Number.isFinite(value)
    ? value === 0
      ? '0'
      : '' + value
    : canonicalJson(value);
const text: Writer = (value) => (typeof value === 'string' ? str(value) : canonicalJson(value));
const bool: Writer = (value) => (value === true ? 'true' : value === false ? 'false' : canonicalJson(value));

/** The record's own keys in code-unit order (an insertion sort: linear when already sorted, as parsed inputs are). */
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

/**
 * A writer for objects of a known shape: the object's own keys in sorted order, each known member
 * by its writer, an unknown one by the generic writer, undefined members left out — exactly what
 * canonicalJson writes. Not an object (or an array): the generic writer.
 */
function shape(writers: Readonly<Record<string, Writer>>): Writer {
  const members: Member[] = Object.keys(writers)
    .sort()
    .map((key) => ({ key, prefix: JSON.stringify(key) + ':', write: writers[key]! }));
  return (value) => {
    if (value === null || typeof value !== 'object' || Array.isArray(value)) return canonicalJson(value);
    const record = value as Record<string, unknown>;
    const keys = sortedKeys(record);
    let out = '';
    let at = 0;
    for (let i = 0; i < keys.length; i++) {
      const key = keys[i]!;
      const member = record[key];
      if (member === undefined) continue;
      // Both lists are sorted: the known member for this key, if any, is at or after `at`.
      while (at < members.length && members[at]!.key < key) at++;
      const known = at < members.length && members[at]!.key === key ? members[at]! : null;
      const written = known ? known.prefix + known.write(member) : str(key) + ':' + canonicalJson(member);
      out = out === '' ? written : out + ',' + written;
    }
    return '{' + out + '}';
  };
}

/** An array whose items are written by `item`; anything else by the generic writer. */
function list(item: Writer): Writer {
  return (value) => {
    if (!Array.isArray(value)) return canonicalJson(value);
    let out = '[';
    for (let i = 0; i < value.length; i++) {
      const entry: unknown = value[i];
      if (i > 0) out += ',';
      // As JSON.stringify and canonicalJson write a hole or undefined in an array.
      out += entry === undefined || typeof entry === 'function' ? 'null' : item(entry);
    }
    return out + ']';
  };
}

function countKeys(value: object): number {
  let n = 0;
  for (const key in value) if (Object.prototype.hasOwnProperty.call(value, key)) n++;
  return n;
}

/** A measured value `{ canonical, note?, unit, value }`, the commonest object of an input, by hand; any other shape by `measuredShape`. */
const measuredShape = shape({ canonical: num, note: text, unit: text, value: num });
const measured: Writer = (entry) => {
  if (entry === null || typeof entry !== 'object') return canonicalJson(entry);
  const { canonical, note, unit, value } = entry as Record<string, unknown>;
  if (
    typeof canonical !== 'number' ||
    typeof value !== 'number' ||
    typeof unit !== 'string' ||
    !Number.isFinite(canonical) ||
    !Number.isFinite(value) ||
    (note !== undefined && typeof note !== 'string') ||
    countKeys(entry) !== (note === undefined && !('note' in entry) ? 3 : 4)
  )
    return measuredShape(entry);
  return (
    '{"canonical":' +
    (canonical === 0 ? '0' : '' + canonical) +
    (note === undefined ? ',"unit":' : ',"note":' + str(note) + ',"unit":') +
    str(unit) +
    ',"value":' +
    (value === 0 ? '0' : '' + value) +
    '}'
  );
};

/** An answer `{ note?, value }` by hand; any other shape by `answerShape`. */
const answerShape = shape({ note: text, value: text });
const answer: Writer = (entry) => {
  if (entry === null || typeof entry !== 'object') return canonicalJson(entry);
  const { note, value } = entry as Record<string, unknown>;
  if (
    typeof value !== 'string' ||
    (note !== undefined && typeof note !== 'string') ||
    countKeys(entry) !== (note === undefined && !('note' in entry) ? 1 : 2)
  )
    return answerShape(entry);
  return note === undefined
    ? '{"value":' + str(value) + '}'
    : '{"note":' + str(note) + ',"value":' + str(value) + '}';
};

/**
 * A force trace's samples (thousands of `{ f, t }`): when every sample has exactly `f` then `t`
 * (the canonical order, which is also the order PostgreSQL's jsonb keeps them in) and finite
 * numbers, the native writer writes the canonical JSON; otherwise the generic writer does.
 */
const samples: Writer = (value) => {
  if (!Array.isArray(value)) return canonicalJson(value);
  for (let i = 0; i < value.length; i++) {
    const sample = value[i] as Record<string, unknown> | null;
    if (typeof sample !== 'object' || sample === null || Array.isArray(sample)) return canonicalJson(value);
    let at = 0;
    for (const key in sample) {
      if (key !== (at === 0 ? 'f' : 't') || !Number.isFinite(sample[key])) return canonicalJson(value);
      at++;
    }
    if (at !== 2) return canonicalJson(value);
  }
  return JSON.stringify(value);
};

/** The members of the input other than the answers and measurements, by their schemas (input.ts). */
const RECORD_WRITERS: Readonly<Record<string, Writer>> = {
  entrapment: shape({
    devices: list(shape({ direction: text, monitored: bool, note: text, type: text, zone: text })),
    edition: text,
    zones: list(shape({ direction: text, note: text, zone: text })),
  }),
  forceTests: list(
    shape({
      direction: text,
      gapMm: num,
      heightMm: num,
      location: text,
      note: text,
      samples,
      summary: shape({ durationAbove150S: num, peakN: num, residualAt5sN: num, staticN: num }),
    }),
  ),
  profile: shape({
    automaticClosing: bool,
    kind: text,
    leafHeight: measured,
    leafWeight: measured,
    leafWidth: measured,
    leaves: text,
    openingDirection: text,
    operatorListed: bool,
    operatorManufacturedOn: text,
    usageClass: num,
  }),
  site: shape({
    childrenOrPetsPresent: bool,
    pedestriansUseDriveway: bool,
    publicAccess: bool,
    slopeAcrossSwing: bool,
  }),
  swingGeometry: shape({
    aMm: num,
    bMm: num,
    bracketFromHingeMm: num,
    bracketOffsetMm: num,
    leafThicknessMm: num,
    operatorBodyLengthMm: num,
    operatorHalfWidthMm: num,
    retractedLengthMm: num,
    strokeMm: num,
    targetOpeningDeg: num,
  }),
};
const hrnOverride = shape({ dph: text, fe: text, lo: text, np: text, reason: text });
/** HRN overrides are keyed by rule id: a dictionary of known entries. */
const hrnOverrides: Writer = dictionary(hrnOverride);

/** A record keyed by data (rule ids): every value by `entry`. */
function dictionary(entry: Writer): Writer {
  return (value) => {
    if (value === null || typeof value !== 'object' || Array.isArray(value)) return canonicalJson(value);
    const record = value as Record<string, unknown>;
    const keys = sortedKeys(record);
    let out = '';
    for (let i = 0; i < keys.length; i++) {
      const key = keys[i]!;
      const member = record[key];
      if (member === undefined) continue;
      const written = str(key) + ':' + entry(member);
      out = out === '' ? written : out + ',' + written;
    }
    return '{' + out + '}';
  };
}

/** The record's top-level members after `answers`/`choices`, in canonical (sorted) order. */
const REST = [
  'entrapment',
  'forceTests',
  'hrnOverrides',
  'measurements',
  'profile',
  'site',
  'swingGeometry',
] as const;

/** Per version: each question key's `"key":` and whether its answer is a yes/no/na one (goes under `answers`). */
interface KeyText {
  prefix: string;
  yesNo: boolean;
}
const keyTexts = new WeakMap<CompiledRuleset, Map<string, KeyText>>();

function keyTextsOf(compiled: CompiledRuleset): Map<string, KeyText> {
  let texts = keyTexts.get(compiled);
  if (!texts) {
    texts = new Map();
    for (const [key, q] of compiled.questionByKey)
      texts.set(key, { prefix: JSON.stringify(key) + ':', yesNo: q.answerType === 'yes_no_na' });
    keyTexts.set(compiled, texts);
  }
  return texts;
}

/**
 * The canonical JSON of the input's record form (see the module comment). `entries`: the input's
 * answers and measurements when the caller has already read them (scoring does).
 */
export function inputRecordJson(
  input: AssessmentInput,
  compiled: CompiledRuleset,
  entries?: InputEntries,
): string {
  try {
    return write(input, compiled, entries);
  } catch (error) {
    // Name where the problem is, from the top of the input (canonicalJson throws with the path).
    if (error instanceof TypeError) canonicalJson(input);
    throw error;
  }
}

const isRecord = (value: unknown): value is object =>
  value !== null && typeof value === 'object' && !Array.isArray(value);

function write(input: AssessmentInput, compiled: CompiledRuleset, given: InputEntries | undefined): string {
  if (!isRecord(input)) return canonicalJson(input);
  const entries = given ?? inputEntries(input);
  const texts = keyTextsOf(compiled);
  let out = '';
  if (input.answers !== undefined) {
    // Not a record: the split has nothing to split (the engine would have refused it before here).
    if (!isRecord(input.answers)) throw new TypeError('answers is not a record');
    const { keys, values } = entries.answers;
    const order = sortedOrder(keys);
    let yesNo = '';
    let choices = '';
    for (let n = 0; n < keys.length; n++) {
      const i = order === null ? n : order[n]!;
      const entry = values[i];
      if (entry === undefined) continue;
      const key = keys[i]!;
      const known = texts.get(key);
      const member = (known ? known.prefix : str(key) + ':') + answer(entry);
      if (known?.yesNo) yesNo = yesNo === '' ? member : yesNo + ',' + member;
      else choices = choices === '' ? member : choices + ',' + member;
    }
    out = '"answers":{' + yesNo + '},"choices":{' + choices + '}';
  }
  for (let n = 0; n < REST.length; n++) {
    const name = REST[n]!;
    const member = input[name] as unknown;
    if (member === undefined) continue;
    let written: string;
    if (name === 'measurements')
      written = isRecord(member) ? measurements(entries.measurements, texts) : canonicalJson(member);
    else if (name === 'hrnOverrides') written = hrnOverrides(member);
    else written = RECORD_WRITERS[name]!(member);
    out = out === '' ? '"' + name + '":' + written : out + ',"' + name + '":' + written;
  }
  return '{' + out + '}';
}

/** Whether a measured value has exactly the members `{ canonical, note?, unit, value }`, numbers finite and text strings. */
function isMeasuredValue(
  entry: unknown,
): entry is { canonical: number; note?: string; unit: string; value: number } {
  if (entry === null || typeof entry !== 'object') return false;
  const { canonical, note, unit, value } = entry as Record<string, unknown>;
  return (
    typeof canonical === 'number' &&
    typeof value === 'number' &&
    typeof unit === 'string' &&
    Number.isFinite(canonical) &&
    Number.isFinite(value) &&
    (note === undefined || typeof note === 'string') &&
    countKeys(entry) === (note === undefined && !('note' in entry) ? 3 : 4)
  );
}

/** Scratch lists for one measurements record (measurements never re-enters itself): its numbers, and which entries gave them. */
const numbers: number[] = [];
const regular: boolean[] = [];
const NO_NUMBERS: readonly string[] = [];

/**
 * Measurements, keyed by question: each key's text from the version, each entry's numbers written
 * together by one native JSON.stringify of a number list (a double written from script cost several
 * times as much, and the measured values are most of an input's numbers; JSON.stringify writes a
 * finite number as canonicalJson does, -0 as 0), any entry of another shape by `measured`.
 */
function measurements(record: RecordEntries, texts: Map<string, KeyText>): string {
  const { keys, values } = record;
  const order = sortedOrder(keys);
  numbers.length = 0;
  for (let n = 0; n < keys.length; n++) {
    const entry = values[order === null ? n : order[n]!];
    if ((regular[n] = isMeasuredValue(entry))) numbers.push(entry.canonical, entry.value);
  }
  const written = numbers.length > 0 ? JSON.stringify(numbers).slice(1, -1).split(',') : NO_NUMBERS;
  let at = 0;
  let out = '';
  for (let n = 0; n < keys.length; n++) {
    const i = order === null ? n : order[n]!;
    const entry = values[i];
    if (entry === undefined) continue;
    const key = keys[i]!;
    const known = texts.get(key);
    let member = known ? known.prefix : str(key) + ':';
    if (regular[n]) {
      const { note, unit } = entry as { note?: string; unit: string };
      member +=
        '{"canonical":' +
        written[at++]! +
        (note === undefined ? ',"unit":' : ',"note":' + str(note) + ',"unit":') +
        str(unit) +
        ',"value":' +
        written[at++]! +
        '}';
    } else member += measured(entry);
    out = out === '' ? member : out + ',' + member;
  }
  return '{' + out + '}';
}

/** SHA-256 of the input's record form. */
export function inputSha256(
  input: AssessmentInput,
  compiled: CompiledRuleset,
  entries?: InputEntries,
): string {
  return sha256Hex(inputRecordJson(input, compiled, entries));
}
