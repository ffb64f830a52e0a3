/**
 * Named prepared statements for the app's parameterised queries, so PostgreSQL plans a query
 * shape once per connection instead of on every call. Knex sends each query with its own text
 * and bound values; the app's queries join up to seven tables, and planning them cost several
 * times their execution (EXPLAIN ANALYZE on the assessment read: planning 13-68 ms, execution
 * 2-6 ms on the shared bench machine). A named statement is parsed and planned once; after five
 * runs PostgreSQL keeps a generic plan when it costs no more than the custom ones
 * (`plan_cache_mode = auto`), so skewed data still gets custom plans.
 *
 * Only texts with bound values are named (`select 1`, BEGIN and DDL are not), at most
 * `maxPerConnection` per connection (the rest go unnamed, as before), and a statement whose
 * cached plan no longer fits the table (a migration changed a column under a running server)
 * is dropped and run again unnamed. `DB_PREPARED_STATEMENTS=0` turns it off.
 */
import { createHash } from 'node:crypto';

const maxPerConnection = 500;

interface QueryConfig {
  text?: unknown;
  values?: unknown[];
  name?: string;
  submit?: unknown;
}
type Callback = (error: (Error & { code?: string }) | null, result?: unknown) => void;
interface RawConnection {
  query: (config: unknown, callback?: unknown) => unknown;
}

export function preparedStatementsOn(): boolean {
  return process.env.DB_PREPARED_STATEMENTS !== '0';
}

const names = new Map<string, string>();
function nameFor(text: string): string {
  let name = names.get(text);
  if (!name) {
    name = `lw_${createHash('sha256').update(text).digest('base64url').slice(0, 24)}`;
    if (names.size < 50_000) names.set(text, name);
  }
  return name;
}

/** Wraps one pg connection's `query` so Knex's parameterised queries run as named statements. */
export function namePreparedStatements(connection: RawConnection): void {
  const query = connection.query.bind(connection);
  const named = new Set<string>();
  connection.query = (config: unknown, callback?: unknown) => {
    const c = config as QueryConfig | null;
    if (
      typeof callback !== 'function' ||
      !c ||
      typeof c !== 'object' ||
      typeof c.text !== 'string' ||
      c.name !== undefined ||
      c.submit !== undefined ||
      !Array.isArray(c.values) ||
      c.values.length === 0
    )
      return query(config, callback);
    const name = nameFor(c.text);
    if (!named.has(name)) {
      if (named.size >= maxPerConnection) return query(config, callback);
      named.add(name);
    }
    return query({ ...c, name }, ((error, result) => {
      // 0A000 "cached plan must not change result type": the table changed under the statement.
      if (error?.code === '0A000') {
        return query(`deallocate "${name}"`, () => {
          named.delete(name);
          const parsed = (connection as { connection?: { parsedStatements?: Record<string, string> } })
            .connection?.parsedStatements;
          if (parsed) delete parsed[name];
          query(config, callback);
        });
      }
      (callback as Callback)(error, result);
    }) as Callback);
  };
}
