/**
 * `npm run rulesets:publish`: validates every file under rulesets/ and publishes it as an
 * immutable version. Unchanged files are skipped; a changed file under a version number
 * that is already published stops the command with a clear error.
 */
import fs from 'node:fs';
import path from 'node:path';
import knex from 'knex';
import { knexConfig } from '../../knexfile';
import { ensureDatabase } from '../../db/launcher';
import { loadRulesetFile } from '../lib/rules';
import { queueImpactAfterPublish } from '../lib/server/impact-runs';
import { publishShippedVersion } from '../lib/server/rulesets';
import { isMain } from './is-main';
import { projectRoot } from './services';

export function rulesetFiles(root = path.join(projectRoot, 'rulesets')): string[] {
  if (!fs.existsSync(root)) return [];
  return fs
    .readdirSync(root, { recursive: true, encoding: 'utf8' })
    .filter((f) => f.endsWith('.json'))
    .sort()
    .map((f) => path.join(root, f));
}

/**
 * Publishes all shipped files (those under `root`, the repository's rulesets/ unless a test
 * names another folder); returns the "family version" labels newly published.
 */
export async function publishRulesetFiles(
  connectionString: string,
  root = path.join(projectRoot, 'rulesets'),
): Promise<string[]> {
  const instance = knex(knexConfig(connectionString));
  const published: string[] = [];
  try {
    for (const file of rulesetFiles(root)) {
      const relative = path.relative(path.dirname(root), file);
      let loaded;
      try {
        loaded = loadRulesetFile(JSON.parse(fs.readFileSync(file, 'utf8')), relative);
      } catch (error) {
        throw new Error(`${relative}: ${(error as Error).message}`);
      }
      const { version: ruleset, contentSha256 } = loaded;
      const outcome = await publishShippedVersion(
        {
          family: ruleset.family,
          title: ruleset.familyTitle,
          region: ruleset.region,
          version: ruleset.version,
          content: ruleset,
          contentSha256,
        },
        instance,
      ).catch((error: Error) => {
        throw new Error(`${relative}: ${error.message}`);
      });
      if (outcome === 'published') {
        published.push(`${ruleset.family} ${ruleset.version}`);
        // Each organisation with signed assessments of the family gets an impact run, queued
        // for the servers (src/lib/server/impact-runs.ts).
        const stored = await instance('ruleset_versions as rv')
          .join('rulesets as r', 'r.id', 'rv.ruleset_id')
          .whereNull('r.organisation_id')
          .andWhere({ 'r.family': ruleset.family, 'rv.version': ruleset.version })
          .first('rv.id');
        if (stored) await queueImpactAfterPublish(stored.id, instance);
      }
    }
    return published;
  } finally {
    await instance.destroy();
  }
}

if (isMain(import.meta.url)) {
  try {
    const { migrationUrl } = await ensureDatabase();
    const published = await publishRulesetFiles(migrationUrl);
    console.log(
      published.length ? `published: ${published.join(', ')}` : 'all ruleset files are already published',
    );
  } catch (error) {
    console.error(`[rulesets] ${(error as Error).message}`);
    process.exit(1);
  }
}
