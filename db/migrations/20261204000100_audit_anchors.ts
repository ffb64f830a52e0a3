/**
 * Anchors of the audit trail: the chain head (latest event id and hash) that a signed report
 * or an archive export carried when it was made. The authoritative copies are outside the
 * database (in the signed PDF and in the ZIP); these rows let the owner's verification notice
 * a trail that ends before an anchored event without being handed the file. Append-only, like
 * the trail itself (and the app role may only read and insert them, see db/roles.ts).
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_anchors', (t) => {
    t.bigIncrements('id').primary();
    t.uuid('organisation_id').references('organisations.id');
    t.text('kind').notNullable().checkIn(['signed_report', 'archive_export']);
    /** The signed report's document id, or the export's `archive.exported` event id. */
    t.text('reference').notNullable();
    t.bigInteger('event_id').notNullable();
    t.text('event_hash').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['event_id']);
  });
  await knex.raw(`
    create function audit_anchors_append_only() returns trigger language plpgsql as $$
    begin
      raise exception 'audit anchors are append-only' using errcode = 'P0001';
    end $$;
    create trigger audit_anchors_append_only before update or delete on audit_anchors
      for each row execute function audit_anchors_append_only();
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('audit_anchors');
  await knex.raw('drop function if exists audit_anchors_append_only cascade');
}
