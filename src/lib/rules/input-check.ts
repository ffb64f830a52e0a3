/**
 * Checks an input against the ruleset version it is scored with: a measurement entered in the
 * wrong kind of unit (a force in millimetres), an answer given for a measured question, a yes/no
 * answer that is not yes, no or na, a choice the question does not offer, a date that is not one, an HRN override for a rule or factor the version does not have.
 * Keys the version does not ask are ignored: an input may carry answers from another version.
 */
import type { z } from 'zod';
import type { CompiledRuleset } from './compile';
import type { AssessmentInput } from './input';
import { inputEntries, type InputEntries } from './input-entries';
import { kindOfUnit, MEASURED_ANSWER_TYPES } from './measures';

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

/** A real calendar date written YYYY-MM-DD (no 2023-02-29), as zod's iso.date() accepts. */
export function isIsoDate(value: string): boolean {
  if (value.length !== 10 || !/^\d{4}-\d{2}-\d{2}$/.test(value)) return false;
  const year = Number(value.slice(0, 4));
  const month = Number(value.slice(5, 7));
  const day = Number(value.slice(8, 10));
  if (month < 1 || month > 12 || day < 1) return false;
  const leap = year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
  const days =
    month === 2 ? (leap ? 29 : 28) : month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
  return day <= days;
}

/**
 * Problems of an already-parsed input against one version; empty when it fits. `entries`: the
 * input's answers and measurements when the caller has already read them (scoring does).
 */
export function checkInputAgainstRuleset(
  input: AssessmentInput,
  compiled: CompiledRuleset,
  entries: InputEntries = inputEntries(input),
): InputIssue[] {
  const issues: InputIssue[] = [];
  const questions = compiled.questionByKey;
  const measurements = entries.measurements;
  for (let i = 0; i < measurements.keys.length; i++) {
    const key = measurements.keys[i]!;
    const q = questions.get(key);
    if (!q) continue;
    const m = measurements.values[i] as { unit: string };
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
  const answers = entries.answers;
  for (let i = 0; i < answers.keys.length; i++) {
    const key = answers.keys[i]!;
    const q = questions.get(key);
    if (!q) continue;
    const { value } = answers.values[i] as { value: string };
    switch (q.answerType) {
      case 'yes_no_na':
        if (value !== 'yes' && value !== 'no' && value !== 'na')
          issues.push({ path: `answers.${key}.value`, message: 'answer yes, no or na' });
        break;
      case 'choice':
        if (!q.options?.some((o) => o.value === value))
          issues.push({
            path: `answers.${key}.value`,
            message: `"${value}" is not one of ${q.options?.map((o) => o.value).join(', ')}`,
          });
        break;
      case 'date':
        if (!isIsoDate(value))
          issues.push({ path: `answers.${key}.value`, message: 'must be a date written YYYY-MM-DD' });
        break;
      case 'text':
        break;
      default:
        issues.push({
          path: `answers.${key}`,
          message: `"${key}" is a measured question (${q.answerType}): send it under measurements`,
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
