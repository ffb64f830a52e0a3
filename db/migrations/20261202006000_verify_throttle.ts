/**
 * Public report verification is throttled per address through the same attempt log as sign-in
 * (kept in the database so every app instance sees the same counts): a new attempt kind, `verify`.
 */
import type { Knex } from 'knex';

const KINDS_BEFORE = ['password', 'link_request', 'link'];
const KINDS_AFTER = [...KINDS_BEFORE, 'verify'];

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
  await allowKinds(knex, KINDS_AFTER);
}

export async function down(knex: Knex): Promise<void> {
  await knex('sign_in_attempts').where({ kind: 'verify' }).del();
  await allowKinds(knex, KINDS_BEFORE);
}
