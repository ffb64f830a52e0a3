/**
 * compiledQuery: a query built and compiled once per shape runs with each call's own values in
 * place of the placeholders, constants stay, and a build that would let one call's value or a
 * placeholder into the SQL text is refused rather than kept. Compiled with Knex's pg client, no
 * database.
 */
import knexFactory from 'knex';
import { describe, expect, it } from 'vitest';
import { compiledQuery } from '../../../src/lib/server/compiled-query';

const knex = knexFactory({ client: 'pg' });

describe('compiledQuery', () => {
  it('builds once per shape and binds each call its own values, constants kept', () => {
    const built: string[] = [];
    const query = compiledQuery(['org', 'id', 'client'] as const, (k, shape, p) => {
      built.push(shape);
      const q = k('assessments as a').where('a.organisation_id', p.org).andWhere('a.id', p.id);
      if (shape === 'homeowner')
        q.andWhere('a.client_id', p.client).whereIn('a.status', ['signed', 'superseded']);
      return q.first('a.id');
    });
    const staff = query.raw(knex, 'office', { org: 'o-1', id: 'a-1', client: null }).toSQL();
    const again = query.raw(knex, 'office', { org: 'o-2', id: 'a-2', client: null }).toSQL();
    const home = query.raw(knex, 'homeowner', { org: 'o-3', id: 'a-3', client: 'c-3' }).toSQL();
    expect(built).toEqual(['office', 'homeowner']);
    expect(staff.sql).toBe(again.sql);
    expect(staff.bindings).toEqual(['o-1', 'a-1', 1]);
    expect(again.bindings).toEqual(['o-2', 'a-2', 1]);
    expect(home.sql).toContain('"a"."status" in (?, ?)');
    expect(home.bindings).toEqual(['o-3', 'a-3', 'c-3', 'signed', 'superseded', 1]);
    // What is sent matches what Knex would have built for those values.
    const direct = knex('assessments as a')
      .where('a.organisation_id', 'o-2')
      .andWhere('a.id', 'a-2')
      .first('a.id')
      .toSQL();
    expect(again.toNative()).toEqual(direct.toNative());
  });

  it('refuses a placeholder in the SQL text and a placeholder changed before binding', () => {
    const inText = compiledQuery(['id'] as const, (k, _shape, p) =>
      k('assessments').whereRaw(`id = '${p.id}'`).select('id'),
    );
    expect(() => inText.raw(knex, 'office', { id: 'a-1' })).toThrow(/in the SQL text/);
    const changed = compiledQuery(['name'] as const, (k, _shape, p) =>
      k('gates').where('label', 'ilike', `%${p.name}%`).select('id'),
    );
    expect(() => changed.raw(knex, 'office', { name: 'yard' })).toThrow(/changed before binding/);
  });

  it('refuses a text whose question marks raw bindings would misread', () => {
    const operator = compiledQuery(['id'] as const, (k, _shape, p) =>
      k('assessments').whereRaw(`scored_summary \\? 'gateLabel'`).andWhere('id', p.id).select('id'),
    );
    expect(() => operator.raw(knex, 'office', { id: 'a-1' })).toThrow(/misread/);
  });
});
