/**
 * Shared mechanics of the domain lists: one filtered base query serves both the page of rows
 * and the total, the order always ends with the id so pages are stable, and free text is
 * matched with LIKE wildcards escaped.
 */
import type { Knex } from 'knex';
import type { Page } from '@/lib/api/common';

export interface PageRequest {
  page: number;
  pageSize: number;
}

export interface ListPlan<Row, Item> {
  /** The filtered query without select, order or limit. */
  base: Knex.QueryBuilder;
  columns: readonly (string | Knex.Raw)[];
  /** Primary sort (column, direction, nulls); the id column follows as tie-breaker. */
  order: { column: string; direction: 'asc' | 'desc' };
  idColumn: string;
  map: (row: Row) => Item;
}

export async function fetchPage<Row, Item>(
  plan: ListPlan<Row, Item>,
  request: PageRequest,
): Promise<Page<Item>> {
  const { base, columns, order, idColumn, map } = plan;
  const nulls = order.direction === 'asc' ? 'nulls last' : 'nulls first';
  const [rows, [{ total }]] = await Promise.all([
    base
      .clone()
      .select(columns)
      .orderByRaw(`?? ${order.direction} ${nulls}, ?? ${order.direction}`, [order.column, idColumn])
      .limit(request.pageSize)
      .offset((request.page - 1) * request.pageSize) as Promise<Row[]>,
    base.clone().count({ total: '*' }) as Promise<{ total: string | number }[]>,
  ]);
  return { items: rows.map(map), page: request.page, pageSize: request.pageSize, total: Number(total) };
}

/**
 * fetchPage in one statement: each row carries the total (`count(*) over ()`, counted before
 * the limit), so a page costs one round trip instead of two. A page with no rows says nothing
 * of the total, so only a page past the end asks for it apart. Suits lists whose page needs a
 * sort of every matching row anyway (no index gives the order), where the window adds nothing
 * but the count.
 */
export async function fetchPageCounted<Row, Item>(
  plan: ListPlan<Row, Item>,
  request: PageRequest,
): Promise<Page<Item>> {
  const { base, columns, order, idColumn, map } = plan;
  const nulls = order.direction === 'asc' ? 'nulls last' : 'nulls first';
  const rows = (await base
    .clone()
    .select([...columns, base.client.raw('count(*) over () as page_total') as Knex.Raw])
    .orderByRaw(`?? ${order.direction} ${nulls}, ?? ${order.direction}`, [order.column, idColumn])
    .limit(request.pageSize)
    .offset((request.page - 1) * request.pageSize)) as (Row & { page_total: string | number })[];
  const total =
    rows.length > 0
      ? Number(rows[0].page_total)
      : request.page === 1
        ? 0
        : Number(((await base.clone().count({ total: '*' })) as { total: string | number }[])[0].total);
  return { items: rows.map(map), page: request.page, pageSize: request.pageSize, total };
}

/** `%text%` for ILIKE with the user's own % and _ taken literally. */
export function containsPattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

export function iso(value: Date | string): string {
  return (value instanceof Date ? value : new Date(value)).toISOString();
}

/** PostgreSQL error codes the domain modules turn into answers rather than 500s. */
export function pgErrorCode(error: unknown): string | undefined {
  return (error as { code?: string } | null)?.code;
}
export const FOREIGN_KEY_VIOLATION = '23503';
