/**
 * `npm run db:restore -- <backup.tar> --yes [--database <name>]`: replaces the database (the
 * app's, or `<name>` on the same server) with the backup's and copies the data files back,
 * checking each against its SHA-256. Stop the app first: the database is dropped and created.
 */
import path from 'node:path';
import { parseArgs } from 'node:util';
import { ensureDatabase } from '../../db/launcher';
import { restoreDatabase } from './backup';
import { migrateLatest } from './migrate';
import { isMain } from './is-main';
import { dataDir } from './services';

if (isMain(import.meta.url)) {
  const { values, positionals } = parseArgs({
    allowPositionals: true,
    options: { yes: { type: 'boolean' }, database: { type: 'string' } },
  });
  const from = positionals[0];
  if (!from) {
    console.error('usage: npm run db:restore -- <backup.tar> --yes [--database <name>]');
    process.exit(2);
  }
  try {
    const endpoints = await ensureDatabase();
    const target = new URL(endpoints.migrationUrl);
    if (values.database) target.pathname = `/${values.database}`;
    const name = target.pathname.slice(1);
    if (!values.yes) {
      console.error(
        `This replaces the database "${name}" and adds the backup's files to ${path.join(dataDir, 'files')}. Run again with --yes to go ahead.`,
      );
      process.exit(2);
    }
    const report = await restoreDatabase({
      from: path.resolve(from),
      databaseUrl: target.toString(),
      adminUrl: endpoints.adminUrl,
      dataDir,
    });
    // The dump carries no owners or grants: bring the schema up to date and grant the app role again.
    await migrateLatest(target.toString(), endpoints.appRole);
    console.log(
      `restored ${report.manifest.database} (backed up ${report.manifest.createdAt}) into "${name}"; ${report.filesRestored} data file(s)`,
    );
    if (report.corruptFiles.length) {
      console.error(
        `[restore] ${report.corruptFiles.length} file(s) in the backup do not match their SHA-256 and were not restored:\n  ${report.corruptFiles.join('\n  ')}`,
      );
      process.exit(1);
    }
  } catch (error) {
    console.error(`[restore] ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  }
}
