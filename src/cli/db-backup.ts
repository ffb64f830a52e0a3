/**
 * `npm run db:backup [-- --out <file.tar>]`: the database and the data files in one tar,
 * by default `.data/backups/latchwell-<time>.tar`. Starts the private database if needed.
 */
import path from 'node:path';
import { parseArgs } from 'node:util';
import { ensureDatabase } from '../../db/launcher';
import { backupDatabase } from './backup';
import { isMain } from './is-main';
import { dataDir } from './services';

if (isMain(import.meta.url)) {
  const { values } = parseArgs({ options: { out: { type: 'string' } } });
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const out = path.resolve(values.out ?? path.join(dataDir, 'backups', `latchwell-${stamp}.tar`));
  try {
    const { migrationUrl } = await ensureDatabase();
    const manifest = await backupDatabase({ databaseUrl: migrationUrl, dataDir, out });
    console.log(`backup written: ${out}`);
    console.log(
      `  database ${manifest.database} (PostgreSQL ${manifest.serverVersion}), dump ${manifest.dumpBytes} bytes, ${manifest.files} data file(s)`,
    );
  } catch (error) {
    console.error(`[backup] ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  }
}
