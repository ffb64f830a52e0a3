/**
 * Sessions that were signed out. A session cookie is a signed token that would otherwise hold
 * until it expires (7 days), so signing out records the token's session id here and every
 * request refuses a revoked id. Rows are only needed until the token would have expired
 * anyway; sign-out drops the expired ones.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('revoked_sessions', (t) => {
    /** The `sid` claim of the session token. */
    t.uuid('id').primary();
    t.uuid('user_id').notNullable().references('users.id').onDelete('cascade');
    t.timestamp('revoked_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    /** When the token expires by itself; after that the row is no longer needed. */
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.index(['expires_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('revoked_sessions');
}
