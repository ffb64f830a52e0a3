/**
 * The one Knex instance of this process. Modules in src/lib/server own their SQL and
 * import `db()` from here; pages and endpoints never call Knex themselves.
 */
import knex, { type Knex } from 'knex';
import { knexConfig } from '../../../knexfile';
import { watchSessionWrites } from './auth/session-cache';
import { watchQueryCount } from './http/query-count';
import { namePreparedStatements, preparedStatementsOn } from './prepared-statements';

let instance: Knex | undefined;

/** Every pooled connection runs the app's parameterised queries as named statements (prepared-statements.ts). */
function withPreparedStatements(config: Knex.Config): Knex.Config {
  if (!preparedStatementsOn()) return config;
  return {
    ...config,
    pool: {
      ...config.pool,
      afterCreate: (
        connection: Parameters<typeof namePreparedStatements>[0],
        done: (e: Error | null) => void,
      ) => {
        namePreparedStatements(connection);
        done(null);
      },
    },
  };
}

export function db(): Knex {
  // Writes that can end a session make this process forget its remembered session checks.
  instance ??= watchQueryCount(watchSessionWrites(knex(withPreparedStatements(knexConfig()))));
  return instance;
}

/** Round-trip time of a trivial query, or the error when the database is unreachable. */
export async function pingDatabase(
  timeoutMs = 2000,
): Promise<{ ok: boolean; latencyMs: number | null; error?: string }> {
  const started = performance.now();
  try {
    await Promise.race([
      db().raw('select 1'),
      new Promise((_, reject) => setTimeout(() => reject(new Error('timed out')), timeoutMs)),
    ]);
    return { ok: true, latencyMs: Math.round((performance.now() - started) * 100) / 100 };
  } catch (error) {
    return { ok: false, latencyMs: null, error: error instanceof Error ? error.message : String(error) };
  }
}

export async function closeDatabase(): Promise<void> {
  await instance?.destroy();
  instance = undefined;
}
