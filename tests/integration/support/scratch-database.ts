/**
 * For migration tests: an empty database of the test file's own, owned by the migration role,
 * made before the file's tests and dropped after them; and a way to run a script against it in a
 * tsx child (knex loads the .ts migrations with Node's own import()).
 */
import { spawnSync, type SpawnSyncReturns } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, inject } from 'vitest';
import { projectRoot } from '../../../src/cli/services';

async function asAdmin(sql: string): Promise<void> {
  const admin = new pg.Client({ connectionString: inject('adminDatabaseUrl') });
  await admin.connect();
  try {
    await admin.query(sql);
  } finally {
    await admin.end();
  }
}

/** Registers the file's hooks; `url` is the scratch database's address once the tests run. */
export function useScratchDatabase(prefix: string): { readonly url: string } {
  const name = `${prefix}_${randomBytes(4).toString('hex')}`;
  let url = '';
  beforeAll(async () => {
    const migrationUrl = new URL(inject('migrationDatabaseUrl'));
    await asAdmin(`create database "${name}" owner "${decodeURIComponent(migrationUrl.username)}"`);
    migrationUrl.pathname = `/${name}`;
    url = migrationUrl.toString();
  });
  afterAll(() => asAdmin(`drop database if exists "${name}" with (force)`));
  return {
    get url() {
      return url;
    },
  };
}

/** Runs an ES module source in a tsx child from the project's root. */
export function runTsx(source: string): SpawnSyncReturns<string> {
  return spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', source], {
    cwd: projectRoot,
    encoding: 'utf8',
  });
}
