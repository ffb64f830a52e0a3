/**
 * Knex configuration. DATABASE_URL points at the database to use; `npm start` and `npm test`
 * set it from the private server that db/launcher.ts runs (see README).
 */
import type { Knex } from 'knex';

export function knexConfig(connectionString = process.env.DATABASE_URL): Knex.Config {
  if (!connectionString)
    throw new Error('DATABASE_URL is not set (run through npm start / npm test, or set it in .env)');
  return {
    client: 'pg',
    connection: { connectionString, application_name: 'latchwell' },
    pool: { min: 0, max: Number(process.env.DB_POOL_MAX ?? 10) },
    migrations: { directory: './db/migrations', tableName: 'knex_migrations', loadExtensions: ['.ts'] },
    seeds: { directory: './db/seeds', loadExtensions: ['.ts'] },
  };
}

export default () => knexConfig();
