/**
 * Staff "forgot password": the one-time e-mailed link reuses `sign_in_links` with a `purpose`
 * (`sign_in` for a homeowner's sign-in link, `password_reset` for a staff reset), so both kinds of
 * link share one token store (SHA-256 only), one expiry and one single-use rule. Reset requests
 * get their own attempt kind, `reset_request`, counted like link requests but apart from them.
 */
import type { Knex } from 'knex';

const KINDS_BEFORE = ['password', 'link_request', 'link', 'verify'];
const KINDS_AFTER = [...KINDS_BEFORE, 'reset_request'];

/** Replaces the check on sign_in_attempts.kind, whatever name it was created under. */
async function allowKinds(knex: Knex, kinds: string[]): Promise<void> {
  const { rows } = await knex.raw<{ rows: Array<{ conname: string }> }>(
    `select conname from pg_constraint
      where conrelid = 'sign_in_attempts'::regclass and contype = 'c' and pg_get_constraintdef(oid) like '%kind%'`,
  );
  for (const { conname } of rows)
    await knex.raw('alter table sign_in_attempts drop constraint ??', [conname]);
  // DDL takes no bound parameters; the kinds are this file's own constants.
  const list = kinds.map((kind) => `'${kind}'`).join(', ');
  await knex.raw(
    `alter table sign_in_attempts add constraint sign_in_attempts_kind_check check (kind in (${list}))`,
  );
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('sign_in_links', (t) => {
    t.text('purpose')
      .notNullable()
      .defaultTo('sign_in')
      .checkIn(['sign_in', 'password_reset'], 'sign_in_links_purpose_check');
  });
  await allowKinds(knex, KINDS_AFTER);
}

export async function down(knex: Knex): Promise<void> {
  await knex('sign_in_attempts').where({ kind: 'reset_request' }).del();
  await allowKinds(knex, KINDS_BEFORE);
  await knex('sign_in_links').where({ purpose: 'password_reset' }).del();
  await knex.schema.alterTable('sign_in_links', (t) => {
    t.dropColumn('purpose');
  });
}
