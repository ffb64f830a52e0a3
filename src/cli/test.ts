/**
 * `npm test`: ensure the private database, recreate the test database, migrate it, publish
 * the shipped rulesets into it, build when stale, then run every vitest project (unit,
 * integration, e2e). Exits non-zero on any failure.
 *
 * `--only <project>` runs one project; anything after `--` goes to vitest.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { ensureDatabase, recreateTestDatabase } from '../../db/launcher';
import { migrateLatest } from './migrate';
import { publishRulesetFiles } from './publish-rulesets';
import { ensureBuilt, projectRoot } from './services';

const args = process.argv.slice(2);
const onlyIndex = args.indexOf('--only');
const only = onlyIndex >= 0 ? args[onlyIndex + 1] : undefined;
const passthrough = args.includes('--') ? args.slice(args.indexOf('--') + 1) : [];

const db = await ensureDatabase();
await recreateTestDatabase(db);
await migrateLatest(db.testUrl);
await publishRulesetFiles(db.testUrl);
if (only !== 'unit') ensureBuilt();

const vitestArgs = ['run', ...(only ? ['--project', only] : []), ...passthrough];
const result = spawnSync(process.execPath, [path.join(projectRoot, 'node_modules/vitest/vitest.mjs'), ...vitestArgs], {
  cwd: projectRoot,
  stdio: 'inherit',
  env: { ...process.env, TEST_DATABASE_URL: db.testUrl, TEST_ADMIN_DATABASE_URL: db.adminUrl },
});
process.exit(result.status ?? 1);
