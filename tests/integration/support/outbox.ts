/**
 * Outbox messages made by hand, as enqueueMail (src/lib/server/outbox.ts) makes them: each row
 * with its pg-boss job in one transaction. For what enqueueMail cannot make — a message with its
 * attempts nearly used up, one already given up on (its job on the dead-letter queue), many at once
 * on another server's database.
 */
import type { Knex } from 'knex';
import PgBoss from 'pg-boss';
import { bossDb } from '../../../src/lib/server/jobs/boss';
import type { OutboxAttachment } from '../../../src/lib/server/outbox';

export interface HandMadeMessage {
  organisation_id: string;
  kind: string;
  to_addresses: string[];
  subject: string;
  text_body: string;
  attachments?: OutboxAttachment[];
  status?: 'queued' | 'failed';
  attempts?: number;
}

export interface HandMadeOptions {
  /** `mail` (default): the job that sends it; `mail-dead`: given up on, waiting for a retry. */
  queue?: 'mail' | 'mail-dead';
  /** The job channel of the server that should take the jobs (OUTBOX_CHANNEL). */
  channel?: string;
}

/** Writes the messages and their jobs in one transaction; answers each message's id and its job's id. */
export async function queueOutboxMessages(
  knex: Knex,
  messages: HandMadeMessage[],
  { queue = 'mail', channel = 'default' }: HandMadeOptions = {},
): Promise<{ id: string; jobId: string }[]> {
  return knex.transaction(async (trx) => {
    const rows: { id: string; organisation_id: string }[] = await trx('outbox_messages')
      .insert(
        messages.map(({ attachments, ...message }) => ({
          ...message,
          ...(attachments ? { attachments: JSON.stringify(attachments) } : {}),
        })),
      )
      .returning(['id', 'organisation_id']);
    const boss = new PgBoss({ db: bossDb(trx), migrate: false });
    const queued: { id: string; jobId: string }[] = [];
    for (const row of rows) {
      const jobId = await boss.send(`${queue}.${channel}`, {
        organisationId: row.organisation_id,
        outboxId: row.id,
      });
      if (!jobId) throw new Error(`pg-boss queued no ${queue} job for outbox message ${row.id}`);
      queued.push({ id: row.id, jobId });
    }
    return queued;
  });
}

/** One message and its job (see queueOutboxMessages). */
export async function queueOutboxMessage(
  knex: Knex,
  message: HandMadeMessage,
  options?: HandMadeOptions,
): Promise<{ id: string; jobId: string }> {
  const [queued] = await queueOutboxMessages(knex, [message], options);
  return queued!;
}
