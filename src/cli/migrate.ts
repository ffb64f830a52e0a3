/** `npm run db:migrate`: start the private database if needed and migrate it to the latest schema. */
import knex from 'knex';
import { knexConfig } from '../../knexfile';
import { ensureDatabase } from '../../db/launcher';
import { isMain } from './is-main';

export async function migrateLatest(connectionString: string): Promise<string[]> {
  const instance = knex(knexConfig(connectionString));
  try {
    const [, applied] = (await instance.migrate.latest()) as [number, string[]];
    return applied;
  } finally {
    await instance.destroy();
  }
}

if (isMain(import.meta.url)) {
  const { appUrl } = await ensureDatabase();
  const applied = await migrateLatest(appUrl);
  console.log(applied.length ? `applied ${applied.length} migration(s):\n  ${applied.join('\n  ')}` : 'database is up to date');
}
