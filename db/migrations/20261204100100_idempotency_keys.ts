/**
 * Idempotency-Key support for creates: the first successful answer to a key is kept (per
 * organisation and user) so a retry after a lost answer gets that answer again instead of a
 * second row. The primary key makes two concurrent requests with one key wait for each other:
 * the second sees the first's stored answer.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('idempotency_keys', (t) => {
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('cascade');
    t.uuid('user_id').notNullable().references('users.id').onDelete('cascade');
    t.text('key').notNullable();
    t.text('method').notNullable();
    t.text('path').notNullable();
    /** SHA-256 of method, path, content type and body: the same key with another request is refused. */
    t.text('request_sha256').notNullable();
    t.integer('response_status').notNullable();
    t.jsonb('response_headers').notNullable().defaultTo('{}');
    t.text('response_body').notNullable().defaultTo('');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.primary(['organisation_id', 'user_id', 'key']);
    t.index(['expires_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('idempotency_keys');
}
