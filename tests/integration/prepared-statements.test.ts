/**
 * The app's parameterised queries run as named prepared statements (planned once per
 * connection), and a statement whose table changed under it runs again instead of failing.
 * Against the real PostgreSQL, on one connection wrapped as the app's pool wraps each one.
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { namePreparedStatements } from '../../src/lib/server/prepared-statements';

let client: pg.Client;
beforeAll(async () => {
  client = new pg.Client({ connectionString: inject('databaseUrl') });
  await client.connect();
  namePreparedStatements(client as unknown as Parameters<typeof namePreparedStatements>[0]);
});
afterAll(async () => {
  await client.end();
});

/** Knex's way of calling a pg connection: a config object and a callback. */
function knexStyle(text: string, values: unknown[]): Promise<pg.QueryResult> {
  return new Promise((resolve, reject) =>
    (client.query as unknown as (c: unknown, cb: (e: Error | null, r: pg.QueryResult) => void) => void)(
      { text, values },
      (error, result) => (error ? reject(error) : resolve(result)),
    ),
  );
}

describe('named prepared statements', () => {
  it('prepares a query with bound values once and reuses it; a query without values stays unnamed', async () => {
    await client.query('create temp table gate_probe (id int primary key, label text)');
    await client.query(`insert into gate_probe values (1, 'north'), (2, 'south')`);
    const text = 'select label from gate_probe where id = $1';
    expect((await knexStyle(text, [1])).rows).toEqual([{ label: 'north' }]);
    expect((await knexStyle(text, [2])).rows).toEqual([{ label: 'south' }]);
    await knexStyle('select count(*)::int as n from gate_probe', []);
    const prepared = await client.query('select statement from pg_prepared_statements');
    expect(prepared.rows.map((r) => r.statement)).toEqual([text]);
  });

  it('runs a statement again, unnamed, when its table changed shape under it', async () => {
    const text = 'select * from gate_probe where id = $1';
    expect((await knexStyle(text, [1])).rows).toEqual([{ id: 1, label: 'north' }]);
    await client.query('alter table gate_probe add column width_mm int');
    expect((await knexStyle(text, [1])).rows).toEqual([{ id: 1, label: 'north', width_mm: null }]);
    // And again, named anew.
    expect((await knexStyle(text, [2])).rows).toEqual([{ id: 2, label: 'south', width_mm: null }]);
  });
});
