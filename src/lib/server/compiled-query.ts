/**
 * A query Knex builds and compiles once per shape instead of on every call. Building the
 * assessment read (seven joined tables, thirty columns) and compiling it to SQL cost Knex some
 * 70-140 µs per request, more than the statement's own execution once PostgreSQL has it prepared.
 *
 * `build` is called with placeholders (strings standing for the named parameters) and compiled;
 * what is kept is the SQL text and, for each binding, which parameter it is or the constant it
 * was. A call runs that text with its own values, through `knex.raw`, so it is counted, logged
 * and prepared like any other query. The text must depend on nothing but the shape and the
 * parameters: the shape names every other fact `build` looks at (e.g. the viewer's role), and
 * every value that differs between calls must be a parameter. A build that lets a placeholder
 * into the SQL text itself, or changes one (so it is neither a parameter nor a constant), or whose
 * text Knex's raw bindings would read differently, is never kept: it throws, so it shows in tests.
 */
import type { Knex } from 'knex';

const marker = '\u0000lw-param\u0000';

type Slot = { param: string } | { value: unknown };

interface Compiled {
  sql: string;
  slots: Slot[];
}

/** A query compiled once per shape; call `raw` with the shape and this call's values. */
export interface CompiledQuery<P extends string> {
  raw(knex: Knex, shape: string, values: Record<P, unknown>): Knex.Raw;
}

export function compiledQuery<P extends string>(
  names: readonly P[],
  build: (knex: Knex, shape: string, placeholders: Record<P, string>) => Knex.QueryBuilder,
): CompiledQuery<P> {
  const byShape = new Map<string, Compiled>();
  const placeholders = Object.fromEntries(names.map((n) => [n, `${marker}${n}${marker}`])) as Record<
    P,
    string
  >;
  const paramOf = new Map<unknown, string>(names.map((n) => [placeholders[n], n]));
  const compile = (knex: Knex, shape: string): Compiled => {
    const { sql, bindings } = build(knex, shape, placeholders).toSQL();
    if (sql.includes(marker)) throw new Error(`compiledQuery: a placeholder is in the SQL text (${shape})`);
    const slots = bindings.map((b): Slot => {
      const param = paramOf.get(b);
      if (param) return { param };
      if (typeof b === 'string' && b.includes(marker))
        throw new Error(`compiledQuery: a placeholder was changed before binding (${shape})`);
      return { value: b };
    });
    const marks = sql.match(/\\?\?\??/g) ?? [];
    if (marks.length !== slots.length || marks.some((m) => m !== '?'))
      throw new Error(`compiledQuery: the SQL text has marks raw bindings would misread (${shape})`);
    return { sql, slots };
  };
  return {
    raw(knex, shape, values) {
      let compiled = byShape.get(shape);
      if (!compiled) {
        compiled = compile(knex, shape);
        if (byShape.size < 100) byShape.set(shape, compiled);
      }
      return knex.raw(
        compiled.sql,
        compiled.slots.map((s) => ('param' in s ? values[s.param as P] : s.value) as Knex.RawBinding),
      );
    },
  };
}
