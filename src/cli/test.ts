/**
 * `npm test`: ensure the private database, create this run's own test database, migrate it,
 * publish the shipped rulesets into it, build when stale and snapshot the build, then run
 * the vitest projects (unit and integration together, then e2e). Exits non-zero on any failure. Several runs
 * on one machine do not disturb each other: each has its own database and build snapshot.
 *
 * `--only <project>` runs one project; anything after `--` goes to vitest.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import {
  appUrlFor,
  dropDatabase,
  ensureDatabase,
  recreateTestDatabase,
  stopDatabase,
} from '../../db/launcher';
import { migrateLatest } from './migrate';
import { publishRulesetFiles } from './publish-rulesets';
import { dataDir, projectRoot, snapshotBuild } from './services';

const args = process.argv.slice(2);
const onlyIndex = args.indexOf('--only');
const only = onlyIndex >= 0 ? args[onlyIndex + 1] : undefined;
const passthrough = args.includes('--') ? args.slice(args.indexOf('--') + 1) : [];

const db = await ensureDatabase();
const testUrl = await recreateTestDatabase(db);
const snapshotDir = path.join(dataDir, 'test-builds', String(process.pid));
let status = 1;
try {
  // Migrations and rulesets as the owner role; the server and the fixtures as the app role.
  await migrateLatest(testUrl, db.appRole);
  await publishRulesetFiles(testUrl);
  const entry = only === 'unit' ? undefined : await snapshotBuild(snapshotDir);
  // Browser journeys run after the rest, not beside it: they share the test database with the
  // integration files (some of which briefly tamper with shared tables on purpose) and the
  // machine's two cores with everything else.
  const phases = only
    ? [['--project', only]]
    : [
        ['--project', 'unit', '--project', 'integration'],
        ['--project', 'e2e'],
      ];
  status = 0;
  for (const phase of phases) {
    const result = spawnSync(
      process.execPath,
      [path.join(projectRoot, 'node_modules/vitest/vitest.mjs'), 'run', ...phase, ...passthrough],
      {
        cwd: projectRoot,
        stdio: 'inherit',
        env: {
          ...process.env,
          TEST_DATABASE_URL: appUrlFor(db, testUrl),
          TEST_MIGRATION_DATABASE_URL: testUrl,
          TEST_ADMIN_DATABASE_URL: db.adminUrl,
          ...(entry ? { LATCHWELL_SERVER_ENTRY: entry } : {}),
        },
      },
    );
    if ((result.status ?? 1) !== 0) status = result.status ?? 1;
  }
} finally {
  fs.rmSync(snapshotDir, { recursive: true, force: true });
  await dropDatabase(db, testUrl).catch(() => {});
  // Leave the machine as we found it: stop the server if this run started it.
  if (db.startedHere) stopDatabase();
}
process.exit(status);
