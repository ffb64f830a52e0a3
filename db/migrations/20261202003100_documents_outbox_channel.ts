/**
 * Outbox channels: a message is delivered only by workers of the channel it was queued on
 * (OUTBOX_CHANNEL, default `default`). One deployment needs nothing more; separate groups of
 * servers that share a database but not an SMTP server (the test projects, a staging copy
 * pointed at a production database) keep their mail apart.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('outbox_messages', (t) => {
    t.text('channel').notNullable().defaultTo('default');
  });
  await knex.raw(
    `alter table outbox_messages add constraint outbox_messages_channel_shape check (channel ~ '^[a-z0-9][a-z0-9_-]{0,39}$')`,
  );
  await knex.raw(
    "create index outbox_messages_due on outbox_messages (channel, next_attempt_at) where status in ('queued', 'sending')",
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop index if exists outbox_messages_due');
  await knex.schema.alterTable('outbox_messages', (t) => {
    t.dropChecks(['outbox_messages_channel_shape']);
    t.dropColumn('channel');
  });
}
