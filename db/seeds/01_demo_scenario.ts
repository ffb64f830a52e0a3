/**
 * Seeds the invented demo scenario into an empty database (`npm start` runs it only when no
 * organisation exists; `npm run db:seed` likewise). It does nothing when the demo
 * organisation is already there.
 */
import type { Knex } from 'knex';
import { demoOrganisation } from './demo/people';

export async function seed(knex: Knex): Promise<void> {
  if (await knex('organisations').where({ slug: demoOrganisation.slug }).first('id')) return;
  // The scenario runs through the app's own server modules, which read DATABASE_URL.
  // Both variables are put back afterwards: `npm start` seeds in its own process and later
  // decides from DATABASE_URL whether the database is its own to stop.
  const connection = knex.client.config.connection as { connectionString?: string };
  const databaseUrl = process.env.DATABASE_URL;
  if (connection?.connectionString) process.env.DATABASE_URL = connection.connectionString;
  // Mail the scenario queues (signing links, signed reports) waits in the outbox for the
  // server's worker; none is sent from the seeding process.
  const worker = process.env.OUTBOX_WORKER;
  process.env.OUTBOX_WORKER = 'off';
  try {
    const { runDemoScenario } = await import('./demo/scenario');
    const made = await runDemoScenario(knex);
    console.log(`[demo] seeded ${made} assessments`);
  } finally {
    if (worker === undefined) delete process.env.OUTBOX_WORKER;
    else process.env.OUTBOX_WORKER = worker;
    if (databaseUrl === undefined) delete process.env.DATABASE_URL;
    else process.env.DATABASE_URL = databaseUrl;
  }
}
