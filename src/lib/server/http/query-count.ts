/**
 * Counts the SQL statements each request sends, for tests and profiling: with
 * `QUERY_COUNT_HEADER=1` every answer carries `x-query-count: <n>` (statements sent while the
 * middleware, the route and anything they awaited ran). Off by default: the count says something
 * about the work behind an answer, which is nobody else's business in production.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import type { Knex } from 'knex';

const counts = new AsyncLocalStorage<{ queries: number }>();

export const queryCountHeader = 'x-query-count';

export function queryCountingOn(): boolean {
  return process.env.QUERY_COUNT_HEADER === '1';
}

/** Runs `fn` counting the statements it sends; returns its result and the count. */
export async function countingQueries<T>(fn: () => Promise<T>): Promise<{ result: T; queries: number }> {
  const count = { queries: 0 };
  const result = await counts.run(count, fn);
  return { result, queries: count.queries };
}

/** Adds one to the running request's count for every statement this Knex instance sends. */
export function watchQueryCount<K extends Knex>(knex: K): K {
  knex.on('query', () => {
    const count = counts.getStore();
    if (count) count.queries++;
  });
  return knex;
}
