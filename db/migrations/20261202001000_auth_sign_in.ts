/**
 * Sign-in support: the attempt log behind throttling (kept in the database so every app
 * instance sees the same counts), one-time e-mailed sign-in links for homeowners, staff
 * invitations, and when each person last signed in. Tokens are stored as SHA-256 hashes only.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sign_in_attempts', (t) => {
    t.bigIncrements('id').primary();
    /** `password`: a staff sign-in; `link_request`: a homeowner asked for a link; `link`: a link was redeemed. */
    t.text('kind').notNullable().checkIn(['password', 'link_request', 'link']);
    t.specificType('email', 'citext');
    t.specificType('ip', 'inet');
    t.boolean('succeeded').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['email', 'created_at']);
    t.index(['ip', 'created_at']);
  });

  await knex.schema.createTable('sign_in_links', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('user_id').notNullable().references('users.id').onDelete('cascade');
    t.text('token_hash').notNullable().unique();
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
    t.specificType('requested_ip', 'inet');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['user_id', 'created_at']);
  });

  await knex.schema.createTable('invitations', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.specificType('email', 'citext').notNullable();
    t.text('role').notNullable().checkIn(['owner', 'office', 'auditor']);
    t.text('token_hash').notNullable().unique();
    t.uuid('invited_by').notNullable().references('users.id').onDelete('restrict');
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('accepted_at', { useTz: true });
    t.uuid('accepted_user_id').references('users.id').onDelete('set null');
    t.timestamp('revoked_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'created_at']);
  });
  await knex.raw(
    `create unique index invitations_one_open_per_email on invitations (email) where accepted_at is null and revoked_at is null`,
  );

  await knex.schema.alterTable('users', (t) => {
    t.timestamp('last_signed_in_at', { useTz: true });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('last_signed_in_at');
  });
  await knex.schema.dropTableIfExists('invitations');
  await knex.schema.dropTableIfExists('sign_in_links');
  await knex.schema.dropTableIfExists('sign_in_attempts');
}
