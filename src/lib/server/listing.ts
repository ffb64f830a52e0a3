/**
 * Shared mechanics of the domain lists: one filtered base query serves both the page of rows
 * and the total, the order always ends with the id so pages are stable, and free text is
 * matched with LIKE wildcards escaped.
 */
import type { Knex } from 'knex';
import { LRUCache } from 'lru-cache';
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
 * The list's total from the page's `count(*) over ()`; a page past the end has no row to carry
 * it, so only then is it counted on its own (and page 1 with no rows is 0).
 */
async function pageTotal(
  base: Knex.QueryBuilder,
  rows: readonly { page_total: string | number }[],
  page: number,
): Promise<number> {
  if (rows.length > 0) return Number(rows[0]!.page_total);
  if (page === 1) return 0;
  return Number(((await base.clone().count({ total: '*' })) as { total: string | number }[])[0]!.total);
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
  const total = await pageTotal(base, rows, request.page);
  return { items: rows.map(map), page: request.page, pageSize: request.pageSize, total };
}

/**
 * The items of the page this process answered last for each list (`listKey`), by row key: what
 * the database need not send again while those rows are unchanged. About 16 MB at most.
 */
const heldPages = new LRUCache<string, Map<string, string>>({
  maxSize: 16 * 1024 * 1024,
  sizeCalculation: (items, listKey) => {
    let size = listKey.length * 2 + 64;
    for (const [key, item] of items) size += (key.length + item.length) * 2 + 64;
    return size;
  },
});

/** Forgets every held page (tests). */
export function forgetHeldPages(): void {
  heldPages.clear();
}

export interface JsonListPlan extends Omit<ListPlan<unknown, unknown>, 'map'> {
  /**
   * SQL over the base query's tables naming what a row's item is made of: its id and the `xmin`
   * of every row the item shows a value of.
   */
  rowKeySql: string;
  /** SQL giving a row's item as JSON over `columns` (the row as the alias given). */
  itemJsonSql: (row: string) => string;
  /**
   * Which list this is (the viewer's scope and the query), to find the items this process sent
   * for it last. A hint only: whether a held item is used is decided by its row's key alone.
   */
  listKey: string;
}

interface PageRow {
  row_key: string;
  item: string | null;
  page_total: string | number;
}

/**
 * fetchPageCounted with the page's JSON text built by the database, byte for byte the text of
 * `JSON.stringify` of the same page, so no row is parsed into objects, mapped and stringified
 * again here; and an item the database sent before is not sent again while its rows are unchanged.
 *
 * The base query decides which rows are on the page, every time. Each row comes with a key (its
 * id and the `xmin` of every row its item is made of: any UPDATE gives a row a new `xmin`), and
 * the text of an item depends on nothing but the rows its key names, so it is the same for every
 * viewer the query lets see the row. The first time a list is asked for, one statement gives the
 * page, its items and total; after that, one statement gives the page's keys and total, and a
 * second the items of only those rows whose keys this process does not hold (rows changed since).
 * A page past the end asks for the total apart, as fetchPageCounted does.
 */
export async function fetchPageJson(plan: JsonListPlan, request: PageRequest): Promise<string> {
  const { base, columns, order, idColumn, rowKeySql, itemJsonSql, listKey } = plan;
  const nulls = order.direction === 'asc' ? 'nulls last' : 'nulls first';
  const client = base.client as Knex.Client;
  const raw = (sql: string, bindings: readonly Knex.RawBinding[] = []) =>
    client.raw(sql, bindings) as unknown as Knex.Raw;
  const unqualified = (column: string) => column.slice(column.indexOf('.') + 1);
  const held = heldPages.get(listKey);
  const ordered = (query: Knex.QueryBuilder) =>
    query
      .orderByRaw(`?? ${order.direction} ${nulls}, ?? ${order.direction}`, [order.column, idColumn])
      .limit(request.pageSize)
      .offset((request.page - 1) * request.pageSize);
  let rows: PageRow[];
  if (!held) {
    // The page with its items, made over the page's own rows (`p`) after the limit.
    const page = ordered(
      base
        .clone()
        .select([...columns, raw(`${rowKeySql} as row_key`), raw('count(*) over () as page_total')]),
    ).as('p');
    rows = (await client
      .queryBuilder()
      .select('p.row_key', raw(`(${itemJsonSql('p')})::text as item`), 'p.page_total')
      .from(page)
      .orderByRaw(`p.?? ${order.direction} ${nulls}, p.?? ${order.direction}`, [
        unqualified(order.column),
        unqualified(idColumn),
      ])) as PageRow[];
  } else {
    const keyed = (await ordered(
      base
        .clone()
        .select([
          raw(`${rowKeySql} as row_key`),
          raw('null as item'),
          raw('count(*) over () as page_total'),
          raw('?? as row_id', [idColumn]),
        ]),
    )) as (PageRow & { row_id: string })[];
    rows = keyed;
    const missing = keyed.filter((r) => !held.has(r.row_key));
    if (missing.length > 0) {
      // Rows changed since: their items, and their keys now (they may have changed again).
      const fresh = (await client
        .queryBuilder()
        .select('p.row_id', 'p.row_key', raw(`(${itemJsonSql('p')})::text as item`))
        .from(
          base
            .clone()
            .select([...columns, raw(`${rowKeySql} as row_key`), raw('?? as row_id', [idColumn])])
            .whereIn(
              idColumn,
              missing.map((r) => r.row_id),
            )
            .as('p'),
        )) as { row_id: string; row_key: string; item: string }[];
      const byId = new Map(fresh.map((f) => [f.row_id, f]));
      // A row the base query no longer gives (changed meanwhile so it no longer matches) is left out.
      rows = keyed.flatMap((r): PageRow[] => {
        if (held.has(r.row_key)) return [r];
        const f = byId.get(r.row_id);
        return f ? [{ row_key: f.row_key, item: f.item, page_total: r.page_total }] : [];
      });
    }
  }
  const total = await pageTotal(base, rows, request.page);
  const answered = new Map<string, string>();
  let items = '';
  for (const row of rows) {
    const item = row.item ?? held?.get(row.row_key);
    if (item === undefined) throw new Error(`the list row ${row.row_key} came back without its item`);
    answered.set(row.row_key, item);
    items += items === '' ? item : `,${item}`;
  }
  heldPages.set(listKey, answered);
  return `{"items":[${items}],"page":${request.page},"pageSize":${request.pageSize},"total":${total}}`;
}

/**
 * SQL giving a timestamptz column as the text of `toISOString()` on the pg driver's Date for it
 * (milliseconds cut, not rounded, as the driver cuts them), or null: years 0-9999 as four
 * digits, others as a sign and six digits (JavaScript's year 0 is 1 BC, -1 is 2 BC). Independent
 * of the session's time zone.
 */
export function isoTextSql(column: string): string {
  const utc = `(${column} at time zone 'UTC')`;
  const time = `'-MM-DD"T"HH24:MI:SS.MS"Z"'`;
  const full = `'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'`;
  // Years before 1 AD or after 9999 (not enterable as a visit date, but the column allows them).
  const pgYear = `extract(year from ${utc})::int`;
  const year = `(case when ${pgYear} < 0 then ${pgYear} + 1 else ${pgYear} end)`;
  const farYear =
    `(case when ${year} between 0 and 9999 then lpad(${year}::text, 4, '0') ` +
    `when ${year} < 0 then '-' || lpad((-${year})::text, 6, '0') else '+' || lpad(${year}::text, 6, '0') end)`;
  return (
    `case when ${column} is null then null ` +
    `when ${utc} >= timestamp '0001-01-01' and ${utc} < timestamp '10000-01-01' then to_char(${utc}, ${full}) ` +
    `else ${farYear} || to_char(${utc}, ${time}) end`
  );
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
