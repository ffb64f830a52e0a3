/**
 * Starts what the integration suite talks to: a mail catcher and the built server on free
 * loopback ports, against the test database that `npm test` recreated and migrated.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { appUrlFor, ensureDatabase, recreateTestDatabase } from '../../../db/launcher';
import { startMailCatcher } from '../../../src/lib/server/mail/catcher';
import { migrateLatest } from '../../../src/cli/migrate';
import { publishRulesetFiles } from '../../../src/cli/publish-rulesets';
import { ensureBuilt, freePort, startAppServer } from '../../../src/cli/services';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    catcherUrl: string;
    smtpUrl: string;
    /** The run's test database as the app role: what the server under test connects as. */
    databaseUrl: string;
    /** The same database as the owner (migration) role: for tests that tamper with tables on purpose. */
    migrationDatabaseUrl: string;
    /** The server's superuser, connected to the maintenance database: creating and dropping databases. */
    adminDatabaseUrl: string;
    dataDir: string;
    /** The environment the server under test runs with, for tests that start a second instance. */
    serverEnv: Record<string, string>;
  }
}

export default async function setup(project: TestProject) {
  let databaseUrl = process.env.TEST_DATABASE_URL;
  let migrationDatabaseUrl = process.env.TEST_MIGRATION_DATABASE_URL;
  let adminDatabaseUrl = process.env.TEST_ADMIN_DATABASE_URL;
  if (!databaseUrl) {
    // Run directly through vitest: do what `npm test` would have done.
    const endpoints = await ensureDatabase();
    migrationDatabaseUrl = await recreateTestDatabase(endpoints);
    await migrateLatest(migrationDatabaseUrl, endpoints.appRole);
    await publishRulesetFiles(migrationDatabaseUrl);
    databaseUrl = appUrlFor(endpoints, migrationDatabaseUrl);
    adminDatabaseUrl = endpoints.adminUrl;
  }
  if (!process.env.LATCHWELL_SERVER_ENTRY) await ensureBuilt();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-test-'));
  const [smtpPort, httpPort, port] = await Promise.all([freePort(), freePort(), freePort()]);
  const catcher = await startMailCatcher({ dir: path.join(dataDir, 'mail'), smtpPort, httpPort });
  const smtpUrl = `smtp://127.0.0.1:${smtpPort}`;
  const catcherUrl = `http://127.0.0.1:${httpPort}`;
  const serverEnv = {
    DATABASE_URL: databaseUrl,
    SMTP_URL: smtpUrl,
    MAIL_CATCHER_URL: catcherUrl,
    AUTH_SECRET: 'integration-test-secret-0123456789abcdef',
    AUTH_TRUST_HOST: 'true',
    // E-mailed links are built from this, never from the request's Host or X-Forwarded-* headers.
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    // The test client plays one proxy: each TestClient sends its own made-up address as
    // X-Forwarded-For, so throttles in one test never spill into another. The server that
    // trusts no proxy is tested on its own instance (client-address.test.ts).
    TRUST_PROXY: '1',
    LATCHWELL_DATA_DIR: dataDir,
    LATCHWELL_ENV: 'test',
    // Each project has its own server and catcher on the one test database: keep their mail
    // apart, or one project's outbox worker would deliver the other's messages to its catcher.
    OUTBOX_CHANNEL: project.name === 'integration' ? 'default' : project.name,
    // Every answer says how many SQL statements it took (session-cost.test.ts counts them).
    QUERY_COUNT_HEADER: '1',
    // The suite's servers send no scheduled reminders: they would mail every test organisation
    // with a due gate. tests/integration/background-jobs.test.ts runs servers with the schedule on.
    REINSPECTION_SCHEDULE: 'off',
  };
  const server = await startAppServer({ port, quiet: true, env: serverEnv });
  project.provide('serverEnv', serverEnv);
  project.provide('baseUrl', server.url);
  project.provide('catcherUrl', catcherUrl);
  project.provide('smtpUrl', smtpUrl);
  project.provide('databaseUrl', databaseUrl);
  project.provide('migrationDatabaseUrl', migrationDatabaseUrl ?? databaseUrl);
  project.provide('adminDatabaseUrl', adminDatabaseUrl ?? databaseUrl);
  project.provide('dataDir', dataDir);

  return async () => {
    await server.stop();
    await catcher.close();
    fs.rmSync(dataDir, { recursive: true, force: true });
  };
}
