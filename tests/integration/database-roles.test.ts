/**
 * The server runs as a database role that cannot rewrite the audit trail: no superuser, owns
 * no table, so it can neither switch the append-only triggers off (directly or through
 * `session_replication_role`) nor alter a table, and it holds no UPDATE, DELETE or TRUNCATE
 * on the trail. `testDb()` connects exactly as the server does (the app role); the owner role
 * (`ownerTestDb()`) is what migrations run as.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import {
  closeTestDb,
  createOrganisation,
  fixturePassword,
  ownerTestDb,
  signIn,
  testDb,
} from './support/fixtures';

let eventId: number;

beforeAll(async () => {
  const org = await createOrganisation('roles');
  // One ordinary audited change, so the trail has an event of this file to aim at.
  const owner = await signIn(org.owner.email, fixturePassword);
  expect((await owner.json('PATCH', '/api/organisation', { remindClients: true })).status).toBe(200);
  const row = await testDb()('audit_events')
    .where({ organisation_id: org.id })
    .orderBy('id', 'desc')
    .first('id');
  eventId = Number(row.id);
});

afterAll(async () => {
  await closeTestDb();
});

const appUser = () => decodeURIComponent(new URL(inject('databaseUrl')).username);

describe('the database role the app runs as', () => {
  it('is the role the server under test connects as, and not the role that owns the schema', async () => {
    expect(appUser()).not.toBe(decodeURIComponent(new URL(inject('migrationDatabaseUrl')).username));
    expect(inject('serverEnv').DATABASE_URL).toBe(inject('databaseUrl'));
    // Make the server use its pool, then look at who its connections are.
    expect((await fetch(`${inject('baseUrl')}/api/health`)).status).toBe(200);
    const { rows } = await testDb().raw<{ rows: { usename: string }[] }>(
      `select distinct usename from pg_stat_activity where datname = current_database() and application_name = 'latchwell'`,
    );
    expect(rows.map((r) => r.usename)).toEqual([appUser()]);
  });

  it('is no superuser and owns no table, sequence or function', async () => {
    const { rows } = await testDb().raw<{
      rows: { rolsuper: boolean; rolcreaterole: boolean; rolcreatedb: boolean; rolbypassrls: boolean }[];
    }>(
      'select rolsuper, rolcreaterole, rolcreatedb, rolbypassrls from pg_roles where rolname = current_user',
    );
    expect(rows[0]).toEqual({
      rolsuper: false,
      rolcreaterole: false,
      rolcreatedb: false,
      rolbypassrls: false,
    });
    const owned = await testDb().raw<{ rows: { n: string }[] }>(
      `select (select count(*) from pg_class c join pg_namespace s on s.oid = c.relnamespace where s.nspname = 'public' and c.relowner = (select oid from pg_roles where rolname = current_user))
            + (select count(*) from pg_proc p join pg_namespace s on s.oid = p.pronamespace where s.nspname = 'public' and p.proowner = (select oid from pg_roles where rolname = current_user)) as n`,
    );
    expect(Number(owned.rows[0]!.n)).toBe(0);
  });

  it('cannot set session_replication_role (which would skip every trigger)', async () => {
    await expect(
      testDb().transaction((trx) => trx.raw('set local session_replication_role = replica')),
    ).rejects.toThrow(/permission denied/);
    await expect(
      testDb().transaction((trx) =>
        trx.raw(`select set_config('session_replication_role', 'replica', true)`),
      ),
    ).rejects.toThrow(/permission denied/);
  });

  it("cannot switch a table's triggers off, alter or drop it", async () => {
    for (const sql of [
      'alter table audit_events disable trigger audit_events_append_only',
      'alter table audit_events disable trigger all',
      'alter table documents disable trigger user',
      'alter table audit_events add column note text',
      'drop trigger audit_events_append_only on audit_events',
      'drop table audit_anchors',
    ]) {
      await expect(
        testDb().transaction((trx) => trx.raw(sql)),
        sql,
      ).rejects.toThrow(/must be owner/);
    }
    await expect(
      testDb().transaction((trx) =>
        trx.raw(`set local role "${decodeURIComponent(new URL(inject('migrationDatabaseUrl')).username)}"`),
      ),
    ).rejects.toThrow(/permission denied/);
  });

  it('works the job queue by rows only: creates no table there, and only the product’s queues through their function', async () => {
    for (const [sql, error] of [
      [`select pgboss.create_queue('anything', '{}'::json)`, /permission denied for function/],
      [`select pgboss.delete_queue('mail.default')`, /permission denied for function/],
      ['create table pgboss.sneaky (id int)', /permission denied for schema/],
      ['drop table pgboss.job', /must be owner/],
      ['alter table pgboss.queue add column note text', /must be owner/],
      [`select pgboss.latchwell_ensure_queues('Not A Channel!')`, /invalid job channel/],
    ] as const)
      await expect(
        testDb().transaction((trx) => trx.raw(sql)),
        sql,
      ).rejects.toThrow(error);
    // A new channel's queues, made as the owner through the function; the app role then uses them.
    const channel = `roles-${Date.now().toString(36)}`;
    await testDb().raw('select pgboss.latchwell_ensure_queues(?)', [channel]);
    const { rows } = await testDb().raw(
      `select q.name, pg_get_userbyid(c.relowner) as owner from pgboss.queue q
         join pg_class c on c.relname = q.partition_name
        where q.name like ?`,
      [`%.${channel}`],
    );
    expect(rows.map((r: { name: string }) => r.name.split('.')[0]).sort()).toEqual([
      'impact-slice',
      'mail',
      'mail-dead',
      'reinspection-reminders',
      'reinspection-sweep',
    ]);
    for (const r of rows) expect(r.owner).not.toBe(appUser());
    const [job] = await testDb()('pgboss.job')
      .insert({ name: `mail.${channel}`, data: { organisationId: null } })
      .returning('id');
    expect(await testDb()('pgboss.job').where({ id: job.id }).delete()).toBe(1);
  });

  it('may read and append to the audit trail, but not update, delete or truncate it', async () => {
    expect(await testDb()('audit_events').where({ id: eventId }).first('id')).toBeTruthy();
    for (const sql of [
      `update audit_events set actor_label = 'someone else' where id = ${eventId}`,
      `delete from audit_events where id = ${eventId}`,
      'truncate audit_events',
      'update audit_anchors set event_hash = event_hash',
      'delete from audit_anchors',
      'truncate audit_anchors',
      'delete from knex_migrations',
    ]) {
      await expect(
        testDb().transaction((trx) => trx.raw(sql)),
        sql,
      ).rejects.toThrow(/permission denied/);
    }
    expect(await testDb()('audit_events').where({ id: eventId }).first('id')).toBeTruthy();
  });

  it('gets the grants of a table a later migration adds without anyone granting them again', async () => {
    const table = `roles_probe_${process.pid}_${Date.now()}`;
    await ownerTestDb().schema.createTable(table, (t) => {
      t.bigIncrements('id');
      t.text('note');
    });
    try {
      await testDb()(table).insert({ note: 'written by the app role' });
      expect(await testDb()(table).count({ n: '*' })).toEqual([{ n: '1' }]);
      await expect(testDb().transaction((trx) => trx.raw(`truncate ${table}`))).rejects.toThrow(
        /permission denied/,
      );
    } finally {
      await ownerTestDb().schema.dropTable(table);
    }
  });
});
