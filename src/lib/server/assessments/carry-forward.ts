/**
 * Re-inspection from the last signed visit: a new draft takes that visit's answers and
 * measurements (those the new draft's ruleset still asks), each marked pending until the
 * auditor confirms it or changes it. What scoring does with them:
 *
 * - The live preview scores carried answers like any other (they are the best knowledge of the
 *   gate), and the walk-through marks each "carried forward: confirm".
 * - Submit refuses (422) while any carried answer is unconfirmed, one error per answer, so a
 *   stored result never rests on an answer nobody looked at on this visit.
 * - Confirming keeps the value; changing it (any save of that key) confirms it too.
 *
 * Observations (sensing devices, swing geometry, force tests) are not carried: they are
 * measured again.
 */
import type { Knex } from 'knex';
import { MEASURED_ANSWER_TYPES } from '@/lib/rules/measures';
import { ConflictError, InvalidInputError } from '../errors';

export interface CarriedForward {
  fromAssessmentId: string;
  fromVisitedOn: string | null;
  /** `answers.<key>` / `measurements.<key>` still to be confirmed or changed. */
  pending: string[];
}

interface Question {
  key: string;
  answerType: string;
}

const MEASURED: ReadonlySet<string> = new Set(MEASURED_ANSWER_TYPES);

/** The gate's most recent signed assessment in the organisation, or null. */
export async function lastSignedVisit(
  knex: Knex,
  organisationId: string,
  gateId: string,
): Promise<{
  id: string;
  visited_on: Date | null;
  answers: Record<string, unknown>;
  measurements: Record<string, unknown>;
} | null> {
  const row = await knex('assessments')
    .where({ organisation_id: organisationId, gate_id: gateId, status: 'signed' })
    .orderBy([
      { column: 'visited_on', order: 'desc' },
      { column: 'submitted_at', order: 'desc' },
    ])
    .first('id', 'visited_on', 'answers', 'measurements');
  return row ?? null;
}

/** Each gate's last signed visit date, for the gates that have one (offering to carry forward). */
export async function lastSignedVisitDays(
  knex: Knex,
  organisationId: string,
  gateIds: string[],
): Promise<Map<string, Date>> {
  if (gateIds.length === 0) return new Map();
  const rows = await knex('assessments')
    .where({ organisation_id: organisationId, status: 'signed' })
    .whereIn('gate_id', gateIds)
    .groupBy('gate_id')
    .select<{ gate_id: string; last: Date }[]>('gate_id', knex.raw('max(visited_on) as last'));
  return new Map(rows.map((r) => [r.gate_id, r.last]));
}

/**
 * Copies the last signed visit's answers and measurements into the new draft `assessmentId`
 * (in the same transaction that created it), keeping only keys the draft's pinned questions ask
 * in the same kind of answer. Returns what was carried; 422 when there is no signed visit.
 */
export async function carryForwardIntoDraft(
  trx: Knex.Transaction,
  organisationId: string,
  gateId: string,
  assessmentId: string,
  rulesetVersionId: string,
): Promise<CarriedForward> {
  const last = await lastSignedVisit(trx, organisationId, gateId);
  if (!last)
    throw new InvalidInputError('This gate has no signed visit to carry answers forward from.', [
      { field: 'carryForward', message: 'the gate has no signed visit' },
    ]);
  const version = await trx('ruleset_versions')
    .where({ id: rulesetVersionId })
    .first<{ questions: Question[] | null }>(trx.raw("content -> 'questions' as questions"));
  const questions = new Map((version?.questions ?? []).map((q) => [q.key, q]));
  const answers: Record<string, unknown> = {};
  const measurements: Record<string, unknown> = {};
  const pending: string[] = [];
  for (const [key, value] of Object.entries(last.answers ?? {})) {
    const q = questions.get(key);
    if (!q || MEASURED.has(q.answerType)) continue;
    answers[key] = value;
    pending.push(`answers.${key}`);
  }
  for (const [key, value] of Object.entries(last.measurements ?? {})) {
    const q = questions.get(key);
    if (!q || !MEASURED.has(q.answerType)) continue;
    measurements[key] = value;
    pending.push(`measurements.${key}`);
  }
  const carried: CarriedForward = {
    fromAssessmentId: last.id,
    fromVisitedOn: last.visited_on ? new Date(last.visited_on).toISOString() : null,
    pending: pending.sort(),
  };
  await trx('assessments')
    .where({ id: assessmentId, organisation_id: organisationId, status: 'draft' })
    .update({
      answers: JSON.stringify(answers),
      measurements: JSON.stringify(measurements),
      carried_forward: JSON.stringify(carried),
    });
  return carried;
}

/** The draft's carried-forward state, or null when it started empty. */
export async function carriedForwardOf(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
): Promise<CarriedForward | null> {
  const row = await knex('assessments')
    .where({ id: assessmentId, organisation_id: organisationId })
    .first<{ carried_forward: CarriedForward | null } | undefined>('carried_forward');
  return row?.carried_forward ?? null;
}

/** The pending keys a saved patch touches: saving an answer (same value or not) confirms it. */
export function pendingAfterPatch(
  carried: CarriedForward,
  patch: { answers?: Record<string, unknown> | null; measurements?: Record<string, unknown> | null },
): string[] {
  const touched = new Set([
    ...Object.keys(patch.answers ?? {}).map((k) => `answers.${k}`),
    ...Object.keys(patch.measurements ?? {}).map((k) => `measurements.${k}`),
  ]);
  return carried.pending.filter((key) => !touched.has(key));
}

/**
 * Confirms carried answers as they are. Every key must be pending on this draft (else 422 with
 * the key's index); the row version is left alone so an open walk-through's next save still
 * applies.
 */
export async function confirmCarriedForward(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
  keys: string[],
): Promise<CarriedForward | null> {
  return knex.transaction(async (trx) => {
    const row = await trx('assessments')
      .where({ id: assessmentId, organisation_id: organisationId })
      .forUpdate()
      .first<{ status: string; carried_forward: CarriedForward | null } | undefined>(
        'status',
        'carried_forward',
      );
    if (!row) return null;
    if (row.status !== 'draft')
      throw new ConflictError('This assessment is no longer a draft; its answers cannot be confirmed.');
    const carried = row.carried_forward;
    const errors = keys
      .map((key, i) => ({ key, i }))
      .filter(({ key }) => !carried?.pending.includes(key))
      .map(({ i }) => ({
        field: `keys.${i}`,
        message: 'not a carried-forward answer waiting for confirmation',
      }));
    if (errors.length || !carried) throw new InvalidInputError('Some keys cannot be confirmed.', errors);
    const next = { ...carried, pending: carried.pending.filter((k) => !keys.includes(k)) };
    await trx('assessments')
      .where({ id: assessmentId })
      .update({ carried_forward: JSON.stringify(next) });
    return next;
  });
}

/** Submit's check: 422 naming each carried answer not yet confirmed or changed. */
export function assertCarriedForwardConfirmed(carried: CarriedForward | null): void {
  if (!carried || carried.pending.length === 0) return;
  throw new InvalidInputError(
    'Some answers were carried forward from the last signed visit and are not confirmed yet. Confirm or change each one.',
    carried.pending.map((field) => ({
      field,
      message: 'carried forward from the last signed visit: confirm or change it',
    })),
  );
}
