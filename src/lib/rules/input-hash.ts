/**
 * The input hash a result carries (`inputSha256`): SHA-256 of the input's canonical JSON in its
 * record form, which ties a result to exactly what was scored.
 *
 * The record form is the input as results have always hashed it: the answers split by the
 * scored version's question types into `answers` (yes / no / na questions) and `choices`
 * (everything else, a key the version does not ask included). The engine now takes the one
 * stored answer map, but results signed before that carry hashes of this form, and the same
 * documents scored again must give the same result bytes, so the split is kept here, for the
 * hash only. Everything else is written as canonicalJson writes it (keys sorted, undefined
 * members left out, -0 as 0).
 */
import type { CompiledRuleset } from './compile';
import { canonicalJson, sha256Hex } from './hash';
import type { AssessmentInput } from './input';

/** The members of the record form, in canonical (sorted) order, after `answers` and `choices`. */
const REST = [
  'entrapment',
  'forceTests',
  'hrnOverrides',
  'measurements',
  'profile',
  'site',
  'swingGeometry',
] as const;

/** The canonical JSON of the input's record form (see the module comment). */
export function inputRecordJson(input: AssessmentInput, compiled: CompiledRuleset): string {
  try {
    return write(input, compiled);
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
    const keys = Object.keys(answers).sort();
    let yesNo = '';
    let choices = '';
    const questions = compiled.questionByKey;
    for (const key of keys) {
      const entry = answers[key];
      if (entry === undefined) continue;
      const member = canonicalJson(key) + ':' + canonicalJson(entry);
      if (questions.get(key)?.answerType === 'yes_no_na') yesNo += (yesNo ? ',' : '') + member;
      else choices += (choices ? ',' : '') + member;
    }
    out += '"answers":{' + yesNo + '},"choices":{' + choices + '}';
  }
  for (const name of REST) {
    const member = input[name];
    if (member === undefined) continue;
    if (out.length > 1) out += ',';
    out += '"' + name + '":' + canonicalJson(member);
  }
  return out + '}';
}

/** SHA-256 of the input's record form. */
export function inputSha256(input: AssessmentInput, compiled: CompiledRuleset): string {
  return sha256Hex(inputRecordJson(input, compiled));
}
