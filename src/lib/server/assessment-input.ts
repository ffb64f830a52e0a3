/**
 * Between a draft's stored documents and the rules engine: applying a PATCH to the documents
 * (checked against the questions of the pinned ruleset version: the one place they are
 * validated), and handing them to the engine at submit. Pure functions: errors come back as
 * per-field messages named the way the API client knows the fields.
 */
import { z } from 'zod';
import {
  DraftObservationsSchema,
  type AnswerEntry,
  type AssessmentPatch,
  type DraftObservations,
  type MeasurementEntry,
} from '@/lib/api/assessments';
import { applyMergePatch } from '@/lib/merge-patch';
import {
  assembleInput,
  MEASURED_ANSWER_TYPES,
  MeasuredValueSchema,
  YES_NO_NA,
  type AssessmentInput,
  type GateForScoring,
  type MeasuredValue,
  type RulesetQuestion,
} from '@/lib/rules';
import { canonicalValue, kindOfUnit } from '@/lib/rules/measures';
import type { FieldError } from './http/problem';

export type { GateForScoring };

export interface AssessmentDocuments {
  answers: Record<string, AnswerEntry>;
  measurements: Record<string, MeasuredValue>;
  observations: DraftObservations;
}

type Outcome<T> = { ok: true; value: T } | { ok: false; errors: FieldError[] };

const isMeasured = (q: RulesetQuestion) =>
  (MEASURED_ANSWER_TYPES as readonly string[]).includes(q.answerType);
const isoDate = z.iso.date();

function issuesAt(prefix: string, error: z.ZodError): FieldError[] {
  return error.issues.map((issue) => ({
    field: [prefix, ...issue.path.map(String)].filter(Boolean).join('.'),
    message: issue.message,
  }));
}

/** A measurement as stored: the entered value and unit with its canonical value (computed when not sent). */
function toMeasured(
  key: string,
  entry: MeasurementEntry,
  question: RulesetQuestion,
  errors: FieldError[],
): MeasuredValue | undefined {
  const kind = kindOfUnit(entry.unit);
  if (!kind) {
    errors.push({ field: `measurements.${key}.unit`, message: `unknown unit "${entry.unit}"` });
    return undefined;
  }
  if (kind !== question.answerType) {
    errors.push({ field: `measurements.${key}.unit`, message: `must be a unit of ${question.answerType}` });
    return undefined;
  }
  const candidate = { ...entry, canonical: entry.canonical ?? canonicalValue(kind, entry.value, entry.unit) };
  const parsed = MeasuredValueSchema.safeParse(candidate);
  if (!parsed.success) {
    errors.push(...issuesAt(`measurements.${key}`, parsed.error));
    return undefined;
  }
  return parsed.data;
}

function checkAnswer(
  key: string,
  entry: AnswerEntry,
  question: RulesetQuestion | undefined,
  errors: FieldError[],
): void {
  const field = `answers.${key}`;
  if (!question) errors.push({ field, message: 'is not a question of the pinned ruleset version' });
  else if (isMeasured(question))
    errors.push({ field, message: 'is a measured question: send it under measurements' });
  else if (question.answerType === 'yes_no_na' && !(YES_NO_NA as readonly string[]).includes(entry.value)) {
    errors.push({ field: `${field}.value`, message: `must be one of: ${YES_NO_NA.join(', ')}` });
  } else if (question.answerType === 'choice' && !question.options?.some((o) => o.value === entry.value)) {
    errors.push({
      field: `${field}.value`,
      message: `must be one of: ${(question.options ?? []).map((o) => o.value).join(', ')}`,
    });
  } else if (question.answerType === 'date' && !isoDate.safeParse(entry.value).success) {
    errors.push({ field: `${field}.value`, message: 'must be a date written YYYY-MM-DD' });
  }
}

/**
 * Applies a PATCH's merge patches to a draft's documents and checks the merged result: every
 * answer and measurement must answer a question of the pinned version in the right form, and
 * the observations must have the engine's shapes.
 */
export function mergeDocuments(
  current: AssessmentDocuments,
  patch: AssessmentPatch,
  questions: readonly RulesetQuestion[],
): Outcome<AssessmentDocuments> {
  const byKey = new Map(questions.map((q) => [q.key, q]));
  const errors: FieldError[] = [];

  const answers = applyMergePatch(current.answers, patch.answers ?? {}) as Record<string, AnswerEntry>;
  for (const [key, entry] of Object.entries(patch.answers ?? {}))
    if (entry) checkAnswer(key, entry, byKey.get(key), errors);

  const measurements: Record<string, MeasuredValue> = { ...current.measurements };
  for (const [key, entry] of Object.entries(patch.measurements ?? {})) {
    if (entry === null) {
      delete measurements[key];
      continue;
    }
    const question = byKey.get(key);
    if (!question)
      errors.push({
        field: `measurements.${key}`,
        message: 'is not a question of the pinned ruleset version',
      });
    else if (!isMeasured(question))
      errors.push({
        field: `measurements.${key}`,
        message: 'is not a measured question: send it under answers',
      });
    else {
      const measured = toMeasured(key, entry, question, errors);
      if (measured) measurements[key] = measured;
    }
  }

  const mergedObservations = applyMergePatch(current.observations, patch.observations ?? {});
  const observations = DraftObservationsSchema.safeParse(mergedObservations);
  if (!observations.success) errors.push(...issuesAt('observations', observations.error));

  if (errors.length || !observations.success) return { ok: false, errors };
  return { ok: true, value: { answers, measurements, observations: observations.data } };
}

/**
 * The engine input for submit, from the gate as it stands, its site's usage class and the
 * draft's documents (assembleInput, the same function the preview and the impact list call).
 * Nothing is parsed again: the documents were checked when saved. What is still missing comes
 * back as field errors.
 */
export function buildEngineInput(
  gate: GateForScoring,
  documents: AssessmentDocuments,
): Outcome<AssessmentInput> {
  const { input, missing } = assembleInput(gate, documents);
  return missing.length ? { ok: false, errors: missing } : { ok: true, value: input };
}
