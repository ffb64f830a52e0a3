/**
 * Between a draft's stored documents and the rules engine: applying a PATCH to the documents
 * (checked against the questions of the pinned ruleset version), and building the engine's
 * input from the gate, its site and the documents at submit. Pure functions: errors come back
 * as per-field messages named the way the API client knows the fields.
 */
import { z } from 'zod';
import {
  DraftObservationsSchema,
  type AnswerEntry,
  type AssessmentPatch,
  type DraftObservations,
  type MeasurementEntry,
} from '@/lib/api/assessments';
import type { Gate } from '@/lib/api/gates';
import { applyMergePatch } from '@/lib/merge-patch';
import {
  AssessmentInputSchema,
  MEASURED_ANSWER_TYPES,
  MeasuredValueSchema,
  YES_NO_NA,
  type AssessmentInput,
  type MeasuredValue,
  type RulesetQuestion,
} from '@/lib/rules';
import { canonicalValue, kindOfUnit } from '@/lib/rules/measures';
import type { FieldError } from './http/problem';

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

/** What the engine is told about the gate: the gate row as it stands, with its site's usage class. */
export interface GateForScoring extends Pick<
  Gate,
  'kind' | 'leaves' | 'openingDirection' | 'widthMm' | 'heightMm' | 'weightKg' | 'entered' | 'operator'
> {
  usageClass: number;
}

function measuredDimension(
  stored: number | null,
  entered: { value: number; unit: string } | undefined,
  canonicalUnit: 'mm' | 'kg',
): MeasuredValue | undefined {
  if (stored === null) return undefined;
  const { value, unit } = entered ?? { value: stored, unit: canonicalUnit };
  const kind = kindOfUnit(unit) ?? (canonicalUnit === 'mm' ? 'length' : 'mass');
  return { value, unit, canonical: canonicalValue(kind, value, unit) };
}

/** Where an engine input path is edited through the API, for error messages. */
function apiFieldOf(path: readonly PropertyKey[]): string {
  const [head, ...rest] = path.map(String);
  const profileFields: Record<string, string> = {
    leafWidth: 'gate.width',
    leafHeight: 'gate.height',
    leafWeight: 'gate.weight',
    operatorListed: 'gate.operator.listed',
    automaticClosing: 'gate.operator.automaticClosing',
    operatorManufacturedOn: 'gate.operator.manufacturedOn',
    usageClass: 'site.usageClass',
  };
  if (head === 'profile')
    return [profileFields[rest[0] ?? ''] ?? `gate.${rest[0] ?? ''}`, ...rest.slice(1)].join('.');
  if (head === 'site') return ['observations.site', ...rest].join('.');
  if (head === 'choices') return ['answers', ...rest].join('.');
  if (head === 'answers' || head === 'measurements') return [head, ...rest].join('.');
  return ['observations', head, ...rest].filter(Boolean).join('.');
}

/**
 * Builds and checks the engine input. Answers split into yes/no/na answers and choices by the
 * pinned version's question types; the profile comes from the gate row, which the auditor can
 * correct on site before submitting.
 */
export function buildEngineInput(
  gate: GateForScoring,
  documents: AssessmentDocuments,
  questions: readonly RulesetQuestion[],
): Outcome<AssessmentInput> {
  const byKey = new Map(questions.map((q) => [q.key, q]));
  const answers: Record<string, AnswerEntry> = {};
  const choices: Record<string, AnswerEntry> = {};
  for (const [key, entry] of Object.entries(documents.answers)) {
    if (byKey.get(key)?.answerType === 'yes_no_na') answers[key] = entry;
    else choices[key] = entry;
  }
  const { site, entrapment, forceTests, swingGeometry, hrnOverrides } = documents.observations;
  const candidate = {
    profile: {
      kind: gate.kind,
      leaves: gate.leaves,
      openingDirection: gate.openingDirection ?? undefined,
      usageClass: gate.usageClass,
      leafWidth: measuredDimension(gate.widthMm, gate.entered.width, 'mm'),
      leafHeight: measuredDimension(gate.heightMm, gate.entered.height, 'mm'),
      leafWeight: measuredDimension(gate.weightKg, gate.entered.weight, 'kg'),
      operatorListed: gate.operator.listed ?? undefined,
      automaticClosing: gate.operator.automaticClosing ?? undefined,
      operatorManufacturedOn: gate.operator.manufacturedOn ?? undefined,
    },
    site: site ?? {},
    answers,
    choices,
    measurements: documents.measurements,
    entrapment,
    forceTests,
    swingGeometry,
    hrnOverrides,
  };
  const parsed = AssessmentInputSchema.safeParse(candidate);
  if (!parsed.success) {
    return {
      ok: false,
      errors: parsed.error.issues.map((issue) => ({
        field: apiFieldOf(issue.path),
        message: /received undefined/.test(issue.message) ? 'is required before submitting' : issue.message,
      })),
    };
  }
  return { ok: true, value: parsed.data };
}
