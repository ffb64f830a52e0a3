/**
 * A draft's autosave writes its documents, `row_version` and `updated_at`, every few seconds
 * while an auditor walks a gate. With `updated_at` in an index (organisation, auditor,
 * updated_at), no save could be a HOT update: each wrote a new entry into every index of the
 * table (ten WAL records instead of two) and left the indexes to bloat. The auditor's list of
 * their own assessments by last change now finds their rows through (organisation, auditor) and
 * sorts them; no index holds a column a draft save writes (tests/integration/autosave-cache).
 * A fill factor of 80 leaves room on each page for the row's next version, which HOT needs.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw(
    'create index if not exists assessments_organisation_id_auditor_id_index on assessments (organisation_id, auditor_id)',
  );
  await knex.raw('drop index if exists assessments_organisation_id_auditor_id_updated_at_index');
  await knex.raw('alter table assessments set (fillfactor = 80)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('alter table assessments reset (fillfactor)');
  await knex.raw(
    'create index if not exists assessments_organisation_id_auditor_id_updated_at_index on assessments (organisation_id, auditor_id, updated_at)',
  );
  await knex.raw('drop index if exists assessments_organisation_id_auditor_id_index');
}
