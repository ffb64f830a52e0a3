/**
 * The background job queue (pg-boss) in its own schema, `pgboss`, created here by the owner role
 * from the SQL pg-boss itself publishes for its schema version, so the server (the app role)
 * never needs to create or alter anything: it starts pg-boss with `migrate: false`.
 *
 * pg-boss keeps each queue's jobs in a table of its own, made when the queue is created. The app
 * role may not create tables, so queues are made through `pgboss.latchwell_ensure_queues`, a
 * SECURITY DEFINER function that creates only this product's fixed set of queues for a channel
 * (src/lib/server/jobs/queues.ts) with fixed options. pg-boss's own create/delete functions are
 * not executable by the app role. Row grants on the schema's tables are in db/roles.ts.
 *
 * Also: `impact_runs`, a ruleset impact run split into slices (src/lib/server/impact-runs.ts),
 * and `reinspection_reminder_runs`, one row per organisation and local day the scheduled
 * reminders ran for (the claim that makes the daily run happen once, whatever the instances).
 */
import type { Knex } from 'knex';
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);

/** pg-boss's schema SQL without its own BEGIN/COMMIT: Knex runs each migration in a transaction. */
function constructionSql(): string {
  const PgBoss = require('pg-boss') as { getConstructionPlans(schema: string): string };
  return PgBoss.getConstructionPlans('pgboss')
    .replace(/^\s*BEGIN;\s*$/m, '')
    .replace(/^\s*COMMIT;\s*$/m, '');
}

/** The queues of one channel and their options (pg-boss queue options, seconds). */
export const ensureQueuesSql = `
create function pgboss.latchwell_ensure_queues(channel text) returns void
language plpgsql security definer set search_path = pg_catalog, pgboss as $$
begin
  if channel is null or channel !~ '^[a-z0-9][a-z0-9_-]{0,39}$' then
    raise exception 'invalid job channel %', channel using errcode = '22023';
  end if;
  if exists (select 1 from pgboss.queue where name = 'impact-slice.' || channel) then
    return;
  end if;
  perform pgboss.create_queue('mail-dead.' || channel,
    json_build_object('policy', 'standard', 'retentionMinutes', 60 * 24 * 60));
  perform pgboss.create_queue('mail.' || channel,
    json_build_object('policy', 'standard', 'retryLimit', 2, 'retryDelay', 30, 'retryBackoff', true,
      'expireInSeconds', 300, 'retentionMinutes', 60 * 24 * 14, 'deadLetter', 'mail-dead.' || channel));
  perform pgboss.create_queue('reinspection-sweep.' || channel,
    json_build_object('policy', 'standard', 'retryLimit', 1, 'retryDelay', 60, 'expireInSeconds', 600));
  perform pgboss.create_queue('reinspection-reminders.' || channel,
    json_build_object('policy', 'standard', 'retryLimit', 3, 'retryDelay', 60, 'retryBackoff', true,
      'expireInSeconds', 600));
  perform pgboss.create_queue('impact-slice.' || channel,
    json_build_object('policy', 'standard', 'retryLimit', 2, 'retryDelay', 10, 'expireInSeconds', 1800));
end;
$$`;

export async function up(knex: Knex): Promise<void> {
  await knex.raw(constructionSql());
  // The queue the scheduler (cron) sends through; pg-boss would create it on start.
  await knex.raw(`select pgboss.create_queue('__pgboss__send-it', '{"policy":"standard"}'::json)`);
  await knex.raw(ensureQueuesSql);
  // Only the owner creates or drops queues (tables); the app role goes through the function above.
  await knex.raw('revoke execute on function pgboss.create_queue(text, json) from public');
  await knex.raw('revoke execute on function pgboss.delete_queue(text) from public');
  await knex.raw('revoke execute on function pgboss.latchwell_ensure_queues(text) from public');
  await knex.raw(`select pgboss.latchwell_ensure_queues('default')`);
  // Mail the previous in-process worker had not sent yet: one job each, due when it was.
  const { rows } = await knex.raw<{ rows: { channel: string }[] }>(
    `select distinct channel from outbox_messages where status in ('queued', 'sending')`,
  );
  for (const { channel } of rows) await knex.raw('select pgboss.latchwell_ensure_queues(?)', [channel]);
  await knex.raw(
    `insert into pgboss.job (name, data, start_after, retry_limit, retry_delay, retry_backoff, expire_in)
     select 'mail.' || channel, jsonb_build_object('outboxId', id, 'organisationId', organisation_id),
            least(next_attempt_at, now()), 2, 30, true, interval '5 minutes'
       from outbox_messages where status in ('queued', 'sending')`,
  );

  await knex.schema.createTable('reinspection_reminder_runs', (t) => {
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('cascade');
    // The organisation's own calendar day the run was for.
    t.date('run_on').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(['organisation_id', 'run_on']);
  });

  await knex.schema.createTable('impact_runs', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('cascade');
    t.uuid('version_id').notNullable().references('ruleset_versions.id').onDelete('cascade');
    t.text('basis').notNullable().checkIn(['latest', 'all']);
    // What started it: a version being published, or someone asking on the impact page.
    t.text('reason').notNullable().checkIn(['published', 'requested']);
    t.text('status').notNullable().defaultTo('queued').checkIn(['queued', 'running', 'done', 'failed']);
    t.integer('slices_total').notNullable().defaultTo(0);
    t.integer('slices_done').notNullable().defaultTo(0);
    // Slices already counted (a slice job run twice is counted once).
    t.specificType('done_slices', 'integer[]').notNullable().defaultTo('{}');
    for (const column of ['considered', 'worse', 'better', 'same', 'unscorable'])
      t.integer(column).notNullable().defaultTo(0);
    // The most severe worse outcomes (at most 500) and a few unscorable ones.
    t.jsonb('items').notNullable().defaultTo('[]');
    t.boolean('truncated').notNullable().defaultTo(false);
    t.jsonb('unscorable_samples').notNullable().defaultTo('[]');
    // The server instances that scored its slices.
    t.specificType('instances', 'text[]').notNullable().defaultTo('{}');
    t.text('last_error');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('started_at', { useTz: true });
    t.timestamp('finished_at', { useTz: true });
    t.index(['organisation_id', 'version_id', 'basis', 'created_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('impact_runs');
  await knex.schema.dropTableIfExists('reinspection_reminder_runs');
  await knex.raw('drop schema if exists pgboss cascade');
}
