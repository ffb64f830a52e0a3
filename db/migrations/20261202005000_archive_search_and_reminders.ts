/**
 * The archive's indexes and its one table of its own.
 *
 * - Free text over gate label, site address and client name: trigram GIN indexes (pg_trgm is
 *   created by the core migration; the client name one exists already). The address is matched
 *   as one string, `archiveAddressSql` in src/lib/server/archive-filters.ts, which must stay
 *   the exact expression indexed here.
 * - The list sorts by visit date (keyset over `(date, id)`), per organisation and per gate.
 * - Impact reads a family's signed assessments version by version in id order; re-inspection
 *   reads each gate's latest signed visit; /verify looks a signed PDF up by its SHA-256.
 * - `reinspection_reminders` remembers which reminder went out for which due date, so asking
 *   twice never mails twice.
 */
import type { Knex } from 'knex';

/** Kept in step with archiveAddressSql (src/lib/server/archive-filters.ts). */
const addressExpression = `(address_line1 || ' ' || city || ' ' || coalesce(postal_code, ''))`;
const visitDateExpression = `(coalesce(visited_on, created_at))`;

export async function up(knex: Knex): Promise<void> {
  await knex.raw('create extension if not exists pg_trgm');
  await knex.raw('create index gates_label_trgm on gates using gin (label gin_trgm_ops)');
  await knex.raw(
    `create index sites_archive_address_trgm on sites using gin (${addressExpression} gin_trgm_ops)`,
  );
  await knex.raw(
    `create index assessments_archive_date on assessments (organisation_id, ${visitDateExpression} desc, id desc)`,
  );
  await knex.raw(
    `create index assessments_archive_gate_date on assessments (gate_id, ${visitDateExpression} desc, id desc)`,
  );
  await knex.raw('create index assessments_archive_version on assessments (ruleset_version_id, status, id)');
  await knex.raw(
    `create index assessments_archive_signed_gate on assessments (organisation_id, gate_id, ${visitDateExpression} desc) where status = 'signed'`,
  );
  await knex.raw(`create index documents_signed_sha256 on documents (sha256) where kind = 'signed_report'`);
  await knex.raw('create index audit_events_organisation_id on audit_events (organisation_id, id)');

  await knex.schema.createTable('reinspection_reminders', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('gate_id').notNullable().references('gates.id').onDelete('cascade');
    /** The due date the reminder was about: a new visit gives a new date and a new reminder. */
    t.date('due_on').notNullable();
    t.text('recipient').notNullable().checkIn(['office', 'client']);
    t.uuid('outbox_message_id').references('outbox_messages.id').onDelete('set null');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['gate_id', 'due_on', 'recipient']);
    t.index(['organisation_id', 'created_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('reinspection_reminders');
  for (const index of [
    'audit_events_organisation_id',
    'documents_signed_sha256',
    'assessments_archive_signed_gate',
    'assessments_archive_version',
    'assessments_archive_gate_date',
    'assessments_archive_date',
    'sites_archive_address_trgm',
    'gates_label_trgm',
  ]) {
    await knex.raw(`drop index if exists ${index}`);
  }
}
