/** `npm run db:seed`: seed the demo scenario into an empty database. */
import knex from 'knex';
import { knexConfig } from '../../knexfile';
import { ensureDatabase } from '../../db/launcher';
import { closeDatabase } from '../lib/server/db';
import { isMain } from './is-main';

/** Runs the seeds when no organisation exists yet; returns whether it seeded. */
export async function seedIfEmpty(connectionString: string): Promise<boolean> {
  const instance = knex(knexConfig(connectionString));
  try {
    const row = await instance('organisations').count<{ count: string }[]>({ count: '*' }).first();
    if (Number(row?.count ?? 0) > 0) return false;
    await instance.seed.run();
    return true;
  } finally {
    await instance.destroy();
    await closeDatabase(); // the scenario ran through the app's own modules and their pool
  }
}

if (isMain(import.meta.url)) {
  const { migrationUrl } = await ensureDatabase();
  console.log(
    (await seedIfEmpty(migrationUrl))
      ? 'seeded the demo scenario'
      : 'database already has data; nothing seeded',
  );
}
