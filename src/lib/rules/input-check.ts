/**
 * Checks an input against the ruleset version it is scored with: a measurement entered in the
 * wrong kind of unit (a force in millimetres), a yes/no given for a measured question, a choice
 * the question does not offer, an HRN override for a rule or factor the version does not have.
 * Keys the version does not ask are ignored: an input may carry answers from another version.
 */
import { z } from 'zod';
import type { CompiledRuleset } from './compile';
import type { AssessmentInput } from './input';
import { kindOfUnit } from './measures';
import { MEASURED_ANSWER_TYPES } from './measures';

/** One problem with an input, at the path the form or API should highlight. */
export interface InputIssue {
  path: string;
  message: string;
}

/** Thrown by score() when the input does not parse or does not fit the version. */
export class AssessmentInputError extends Error {
  readonly issues: InputIssue[];

  constructor(issues: InputIssue[]) {
    super(`The assessment input is not valid: ${issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`);
    this.name = 'AssessmentInputError';
    this.issues = issues;
  }
}

/** Zod issues as input issues with dotted paths (`measurements.hingeGapMm.unit`). */
export function issuesFromZod(error: z.ZodError): InputIssue[] {
  return error.issues.map((issue) => ({
    path: issue.path.map(String).join('.') || '(input)',
    message: issue.message,
  }));
}

const measured = new Set<string>(MEASURED_ANSWER_TYPES);
/** A calendar date written YYYY-MM-DD (built once: a zod schema is dear to make per call). */
const IsoDate = z.iso.date();

/** Problems of an already-parsed input against one version; empty when it fits. */
export function checkInputAgainstRuleset(input: AssessmentInput, compiled: CompiledRuleset): InputIssue[] {
  const issues: InputIssue[] = [];
  const questions = compiled.questionByKey;
  const measurements = input.measurements ?? {};
  for (const key of Object.keys(measurements)) {
    const q = questions.get(key);
    if (!q) continue;
    const m = measurements[key] as { unit: string };
    if (!measured.has(q.answerType))
      issues.push({
        path: `measurements.${key}`,
        message: `"${key}" is answered as ${q.answerType}, not measured`,
      });
    else if (kindOfUnit(m.unit) !== q.answerType)
      issues.push({
        path: `measurements.${key}.unit`,
        message: `"${key}" is a ${q.answerType}; "${m.unit}" is not a unit of it`,
      });
  }
  for (const key of Object.keys(input.answers ?? {})) {
    const q = questions.get(key);
    if (q && q.answerType !== 'yes_no_na')
      issues.push({
        path: `answers.${key}`,
        message: `"${key}" is answered as ${q.answerType}, not yes/no/na`,
      });
  }
  const choices = input.choices ?? {};
  for (const key of Object.keys(choices)) {
    const q = questions.get(key);
    if (!q) continue;
    const choice = choices[key] as { value: string };
    if (q.answerType === 'choice') {
      if (!q.options?.some((o) => o.value === choice.value)) {
        issues.push({
          path: `choices.${key}.value`,
          message: `"${choice.value}" is not one of ${q.options?.map((o) => o.value).join(', ')}`,
        });
      }
    } else if (q.answerType === 'date') {
      if (!IsoDate.safeParse(choice.value).success)
        issues.push({ path: `choices.${key}.value`, message: 'must be a date written YYYY-MM-DD' });
    } else if (q.answerType !== 'text') {
      issues.push({
        path: `choices.${key}`,
        message: `"${key}" is answered as ${q.answerType}, not as a choice`,
      });
    }
  }
  const { ruleIds, hrnKeys: factorKeys } = compiled;
  for (const [ruleId, override] of Object.entries(input.hrnOverrides ?? {})) {
    if (!ruleIds.has(ruleId))
      issues.push({ path: `hrnOverrides.${ruleId}`, message: `"${ruleId}" is not a rule of this version` });
    for (const factor of ['lo', 'fe', 'dph', 'np'] as const) {
      const value = override[factor];
      if (value !== undefined && !factorKeys[factor].has(value)) {
        issues.push({
          path: `hrnOverrides.${ruleId}.${factor}`,
          message: `"${value}" is not a ${factor.toUpperCase()} level of this version's HRN table`,
        });
      }
    }
  }
  return issues;
}
