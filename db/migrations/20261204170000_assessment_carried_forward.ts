/**
 * A re-inspection may start from the last signed visit's answers. `carried_forward` names that
 * visit and the answers and measurements still waiting for the auditor to confirm or change
 * them: `{ fromAssessmentId, fromVisitedOn, pending: ["answers.<key>", "measurements.<key>"] }`.
 * Null for an assessment started empty.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assessments', (t) => {
    t.jsonb('carried_forward').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assessments', (t) => {
    t.dropColumn('carried_forward');
  });
}
