/**
 * Indexes for the archive sorted by client or by gate: the list walks clients (or gates) in
 * name order and joins each one's assessments, so the parent's name order must be an index.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('create index clients_archive_name_order on clients (organisation_id, name, id)');
  await knex.raw('create index gates_archive_label_order on gates (organisation_id, label, id)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop index if exists gates_archive_label_order');
  await knex.raw('drop index if exists clients_archive_name_order');
}
