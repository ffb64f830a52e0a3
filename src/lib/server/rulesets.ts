/**
 * Ruleset storage: families and their versions in PostgreSQL. A published version is
 * immutable (enforced by a trigger as well as here); publishing the same file twice is a
 * no-op, and a changed file under an already-published version number is refused.
 */
import type { Knex } from 'knex';
import { db } from './db';

export interface RulesetVersionToPublish {
  family: string;
  title: string;
  region?: string | null;
  version: string;
  content: unknown;
  contentSha256: string;
}

export class RulesetConflictError extends Error {
  constructor(
    readonly family: string,
    readonly version: string,
  ) {
    super(`ruleset ${family} ${version} is already published with different content; publish it under a new version number`);
  }
}

/** Publishes a shipped (organisation-less) version; returns 'published' or 'unchanged'. */
export async function publishShippedVersion(v: RulesetVersionToPublish, knex: Knex = db()): Promise<'published' | 'unchanged'> {
  return knex.transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', [`ruleset:${v.family}`]);
    let ruleset = await trx('rulesets').whereNull('organisation_id').andWhere({ family: v.family }).first('id');
    if (!ruleset) {
      [ruleset] = await trx('rulesets').insert({ family: v.family, title: v.title, region: v.region ?? null }).returning('id');
    }
    const existing = await trx('ruleset_versions').where({ ruleset_id: ruleset.id, version: v.version }).first('id', 'content_sha256', 'status');
    if (existing) {
      if (existing.content_sha256 === v.contentSha256) return 'unchanged';
      if (existing.status !== 'draft') throw new RulesetConflictError(v.family, v.version);
      await trx('ruleset_versions').where({ id: existing.id }).update({ content: JSON.stringify(v.content), content_sha256: v.contentSha256 });
      await trx('ruleset_versions').where({ id: existing.id }).update({ status: 'published', published_at: trx.fn.now() });
      return 'published';
    }
    await trx('ruleset_versions').insert({
      ruleset_id: ruleset.id,
      version: v.version,
      content: JSON.stringify(v.content),
      content_sha256: v.contentSha256,
      status: 'published',
      published_at: trx.fn.now(),
    });
    return 'published';
  });
}
