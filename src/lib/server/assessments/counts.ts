/**
 * Whether gates have assessments on record: a gate, site or client with any cannot be deleted
 * (assessments are kept), so their delete paths ask here inside their own transaction.
 */
import type { Knex } from 'knex';

/** How many assessments name any of the gates (`gateIds`: ids or a subquery selecting them). */
export async function countAssessmentsOfGates(
  trx: Knex | Knex.Transaction,
  gateIds: readonly string[] | Knex.QueryBuilder,
): Promise<number> {
  const [{ count }] = await trx('assessments')
    .whereIn('gate_id', gateIds as string[])
    .count<{ count: string }[]>({ count: '*' });
  return Number(count);
}
