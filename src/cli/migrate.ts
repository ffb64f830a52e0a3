/** `npm run db:migrate`: start the private database if needed and migrate it to the latest schema. */
import knex from 'knex';
import { knexConfig } from '../../knexfile';
import { ensureDatabase } from '../../db/launcher';
import { grantAppRole } from '../../db/roles';
import { isMain } from './is-main';

/**
 * Migrates the database `connectionString` names (connect as the owner role) and, when the
 * app runs as a role of its own, grants that role what it needs (db/roles.ts).
 */
export async function migrateLatest(connectionString: string, appRole?: string | null): Promise<string[]> {
  const instance = knex(knexConfig(connectionString));
  try {
    const [, applied] = (await instance.migrate.latest()) as [number, string[]];
    if (appRole && appRole !== decodeURIComponent(new URL(connectionString).username))
      await grantAppRole(instance, appRole);
    return applied;
  } finally {
    await instance.destroy();
  }
}

if (isMain(import.meta.url)) {
  const { migrationUrl, appRole } = await ensureDatabase();
  const applied = await migrateLatest(migrationUrl, appRole);
  console.log(
    applied.length
      ? `applied ${applied.length} migration(s):\n  ${applied.join('\n  ')}`
      : 'database is up to date',
  );
}
