/**
 * What the app role may do, granted by the owner role after every migration run (and set as
 * its default privileges, so a table a later migration creates is granted the same way even
 * before this runs again).
 *
 * The app role reads and writes rows; it never owns a table, so it cannot alter one, disable
 * its triggers or truncate it. The audit trail and its anchors are append-only for it by
 * privilege as well as by trigger (SELECT and INSERT only), and the migration bookkeeping is
 * not its business at all. In the job queue's schema (`pgboss`) it reads and writes rows and may
 * call the one function that creates this product's queues; it creates no table there.
 */
import type { Knex } from 'knex';

/** Tables the app may only read and append to. */
export const appendOnlyTables = ['audit_events', 'audit_anchors'] as const;

/** Tables the app may not touch. */
const ownerOnlyTables = ['knex_migrations', 'knex_migrations_lock'] as const;

const quoteIdent = (name: string) => `"${name.replace(/"/g, '""')}"`;

/** Grants `appRole` what the server needs in the current database; idempotent. Run as the owner role. */
export async function grantAppRole(knex: Knex, appRole: string): Promise<void> {
  const role = quoteIdent(appRole);
  await knex.transaction(async (trx) => {
    await trx.raw(`grant usage on schema public to ${role}`);
    await trx.raw(`grant select, insert, update, delete on all tables in schema public to ${role}`);
    await trx.raw(`grant usage, select on all sequences in schema public to ${role}`);
    // Tables and sequences the owner creates later get the same grants.
    await trx.raw(
      `alter default privileges in schema public grant select, insert, update, delete on tables to ${role}`,
    );
    await trx.raw(`alter default privileges in schema public grant usage, select on sequences to ${role}`);
    const { rows } = await trx.raw<{ rows: { table_name: string }[] }>(
      `select table_name from information_schema.tables where table_schema = 'public'`,
    );
    const present = new Set(rows.map((r) => r.table_name));
    for (const table of appendOnlyTables) {
      if (present.has(table))
        await trx.raw(
          `revoke update, delete, truncate, references, trigger on ${quoteIdent(table)} from ${role}`,
        );
    }
    for (const table of ownerOnlyTables) {
      if (present.has(table)) await trx.raw(`revoke all on ${quoteIdent(table)} from ${role}`);
    }
    // The job queue (pg-boss, schema `pgboss`): rows only. Its tables are made by the owner (the
    // migration, or the queue function that runs as the owner), never by the app role.
    const { rows: schemas } = await trx.raw<{ rows: unknown[] }>(
      `select 1 from information_schema.schemata where schema_name = 'pgboss'`,
    );
    if (schemas.length) {
      await trx.raw(`grant usage on schema pgboss to ${role}`);
      await trx.raw(`grant select, insert, update, delete on all tables in schema pgboss to ${role}`);
      await trx.raw(
        `alter default privileges in schema pgboss grant select, insert, update, delete on tables to ${role}`,
      );
      await trx.raw(`grant execute on function pgboss.latchwell_ensure_queues(text) to ${role}`);
    }
  });
}
