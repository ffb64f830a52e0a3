/**
 * The mail outbox. A message is a row written in the same transaction as the change it
 * announces, together with the job that sends it (the job queue, jobs/boss.ts: queue `mail`),
 * so both exist exactly when the change does. Any server instance of the channel takes the job
 * and sends through nodemailer. While SMTP is unreachable nothing is lost: each refusal queues
 * the next attempt as a new job after a growing back-off, and the row stays `queued` with the
 * time of that attempt; after OUTBOX_MAX_ATTEMPTS the row is `failed` and the message is put on
 * the dead-letter queue (`mail-dead`), from where the owner's jobs page can retry it.
 *
 * The table stays the record of what was sent (the caught-mail pages and delivery statuses read
 * it). Exactly once: pg-boss hands a job to one instance only, and the row itself is claimed
 * (`queued` to `sending` with a lease end in next_attempt_at) before sending, so a stray second
 * job finds nothing to do; a process that dies mid-send leaves a lease that runs out, and pg-boss
 * gives the expired job to another instance.
 *
 * Where the worker runs: `src/integrations/outbox-worker.ts` adds a tiny middleware that starts
 * the job queue on the first request any server process handles (every launcher polls
 * /api/health at boot), and the endpoints that queue mail wake the worker after their commit.
 */
import type { Knex } from 'knex';
import { db } from './db';
import { mailTransport } from './mail/transport';
import { jobChannel, onJobsStarted, queueName, runningJobs, sendJob, startJobs } from './jobs/boss';
import { storage } from './storage';

export interface OutboxAttachment {
  filename: string;
  contentType: string;
  /** File storage key (SHA-256) of the attachment's bytes. */
  storageKey: string;
}

export interface NewOutboxMessage {
  organisationId: string | null;
  /** What the message is, e.g. `sign_request`, `signed_report`, `signed_report_copy`. */
  kind: string;
  to: string[];
  cc?: string[];
  subject: string;
  text: string;
  html?: string | null;
  attachments?: OutboxAttachment[];
  relatedType?: string | null;
  relatedId?: string | null;
}

export interface OutboxSettings {
  /** Attempts before a message is marked failed. */
  maxAttempts: number;
  /** First retry delay; doubles each attempt up to `retryMaxMs`. */
  retryBaseMs: number;
  retryMaxMs: number;
  /** How often the worker looks for due messages. */
  pollMs: number;
  /** How long a claimed message may take to send before another worker may retry it. */
  leaseMs: number;
  batchSize: number;
}

const envInt = (name: string, fallback: number) => {
  const value = Number(process.env[name]);
  return Number.isFinite(value) && value > 0 ? value : fallback;
};

/** The group of servers that delivers this process's mail (OUTBOX_CHANNEL, default `default`). */
export const outboxChannel = jobChannel;

export function outboxSettings(): OutboxSettings {
  return {
    maxAttempts: envInt('OUTBOX_MAX_ATTEMPTS', 10),
    retryBaseMs: envInt('OUTBOX_RETRY_BASE_MS', 15_000),
    retryMaxMs: envInt('OUTBOX_RETRY_MAX_MS', 30 * 60_000),
    pollMs: envInt('OUTBOX_POLL_MS', 2_000),
    leaseMs: envInt('OUTBOX_LEASE_MS', 120_000),
    batchSize: envInt('OUTBOX_BATCH_SIZE', 10),
  };
}

/** Delay before attempt `attempts + 1`: base × 2^(attempts − 1), capped, with ±20 % jitter. */
export function retryDelayMs(
  attempts: number,
  settings: Pick<OutboxSettings, 'retryBaseMs' | 'retryMaxMs'>,
  random = Math.random,
): number {
  const exponential = settings.retryBaseMs * 2 ** Math.max(0, attempts - 1);
  const capped = Math.min(settings.retryMaxMs, exponential);
  return Math.round(capped * (0.8 + 0.4 * random()));
}

/** Queues a message inside the caller's transaction, with the job that sends it; returns its id. */
export async function enqueueMail(trx: Knex.Transaction, message: NewOutboxMessage): Promise<string> {
  if (!message.to.length) throw new Error('an outbox message needs at least one recipient');
  const [row] = await trx('outbox_messages')
    .insert({
      organisation_id: message.organisationId,
      channel: outboxChannel(),
      kind: message.kind,
      to_addresses: message.to,
      cc_addresses: message.cc ?? [],
      subject: message.subject,
      text_body: message.text,
      html_body: message.html ?? null,
      attachments: JSON.stringify(message.attachments ?? []),
      related_type: message.relatedType ?? null,
      related_id: message.relatedId ?? null,
    })
    .returning('id');
  await queueDelivery(trx, row.id, message.organisationId);
  return row.id;
}

/** The job that makes one delivery attempt of message `outboxId`, sent inside `trx`. */
async function queueDelivery(
  trx: Knex.Transaction,
  outboxId: string,
  organisationId: string | null,
  startAfter?: Date,
): Promise<void> {
  const settings = outboxSettings();
  await sendJob(
    'mail',
    { organisationId, outboxId },
    { trx, startAfter, expireInSeconds: Math.max(30, Math.ceil(settings.leaseMs / 1000)) },
  );
}

/**
 * Kinds whose body carries a one-time link (sign-in, invitation, signing). Once delivered, the
 * body is replaced by a note, so the database (and its backups) keeps no usable token: the
 * tables hold only the tokens' hashes.
 */
export const oneTimeLinkKinds: readonly string[] = [
  'sign_in_link',
  'password_reset',
  'invitation',
  'sign_request',
];
export const sentLinkNote = 'Sent. The one-time link in this message is not kept.';

interface ClaimedMessage {
  id: string;
  organisation_id: string | null;
  kind: string;
  to_addresses: string[];
  cc_addresses: string[];
  subject: string;
  text_body: string;
  html_body: string | null;
  attachments: OutboxAttachment[];
  attempts: number;
}

/**
 * Leases message `id` to this worker and counts the attempt: only a `queued` message, or one
 * whose previous lease ran out (its sender died mid-send). Null when it is not there to send
 * (sent already, given up on, or being sent by another instance right now).
 */
async function claimMessage(
  knex: Knex,
  id: string,
  settings: OutboxSettings,
): Promise<ClaimedMessage | null> {
  const [row] = (await knex('outbox_messages')
    .where({ id })
    .andWhere((w) =>
      w
        .where('status', 'queued')
        .orWhere((q) => q.where('status', 'sending').andWhere('next_attempt_at', '<=', knex.fn.now())),
    )
    .update({
      status: 'sending',
      attempts: knex.raw('attempts + 1'),
      next_attempt_at: knex.raw(`now() + (? * interval '1 millisecond')`, [settings.leaseMs]),
    })
    .returning([
      'id',
      'organisation_id',
      'kind',
      'to_addresses',
      'cc_addresses',
      'subject',
      'text_body',
      'html_body',
      'attachments',
      'attempts',
    ])) as ClaimedMessage[];
  return row ?? null;
}

async function sendOne(message: ClaimedMessage): Promise<void> {
  const attachments = await Promise.all(
    message.attachments.map(async (a) => {
      const content = await storage().get(a.storageKey);
      if (!content) throw new Error(`attachment ${a.filename} (${a.storageKey}) is missing from storage`);
      return { filename: a.filename, contentType: a.contentType, content };
    }),
  );
  await mailTransport().sendMail({
    to: message.to_addresses,
    cc: message.cc_addresses.length ? message.cc_addresses : undefined,
    subject: message.subject,
    text: message.text_body,
    html: message.html_body ?? undefined,
    attachments,
    headers: { 'X-Latchwell-Outbox-Id': message.id },
  });
}

export type DeliveryOutcome = 'sent' | 'retried' | 'failed' | 'skipped';

/**
 * One delivery attempt of one message (what a `mail` job does). A refusal queues the next
 * attempt as a new job, due after the back-off (retryDelayMs), in the same transaction as the
 * row's new state; the last refusal marks the row failed and puts the message on the dead-letter
 * queue (`mail-dead`), where the owner's jobs page can send it round again.
 */
export async function deliverMessage(
  outboxId: string,
  knex: Knex = db(),
  settings = outboxSettings(),
): Promise<DeliveryOutcome> {
  const message = await claimMessage(knex, outboxId, settings);
  if (!message) return 'skipped';
  try {
    await sendOne(message);
  } catch (error) {
    const lastError = (error instanceof Error ? error.message : String(error)).slice(0, 1000);
    if (message.attempts >= settings.maxAttempts) {
      await knex.transaction(async (trx) => {
        await trx('outbox_messages')
          .where({ id: message.id })
          .update({ status: 'failed', last_error: lastError });
        await sendJob(
          'mail-dead',
          { organisationId: message.organisation_id, outboxId: message.id, lastError },
          { trx },
        );
      });
      return 'failed';
    }
    const delay = retryDelayMs(message.attempts, settings);
    await knex.transaction(async (trx) => {
      await trx('outbox_messages')
        .where({ id: message.id })
        .update({
          status: 'queued',
          last_error: lastError,
          next_attempt_at: trx.raw(`now() + (? * interval '1 millisecond')`, [delay]),
        });
      await queueDelivery(trx, message.id, message.organisation_id, new Date(Date.now() + delay));
    });
    return 'retried';
  }
  const redacted = oneTimeLinkKinds.includes(message.kind)
    ? { text_body: sentLinkNote, html_body: null }
    : {};
  await knex('outbox_messages')
    .where({ id: message.id })
    .update({ status: 'sent', sent_at: knex.fn.now(), last_error: null, ...redacted });
  return 'sent';
}

/**
 * Sends a message given up on round again (the jobs page's retry of a dead one): the row is
 * queued with a fresh count of attempts and a new job is queued, in `trx`.
 */
export async function requeueFailedMessage(trx: Knex.Transaction, outboxId: string): Promise<boolean> {
  const [row] = await trx('outbox_messages')
    .where({ id: outboxId, status: 'failed' })
    .update({ status: 'queued', attempts: 0, next_attempt_at: trx.fn.now() })
    .returning(['id', 'organisation_id']);
  if (!row) return false;
  await queueDelivery(trx, row.id, row.organisation_id);
  return true;
}

let mailWorkerId: string | undefined;

onJobsStarted(async (boss) => {
  if (process.env.OUTBOX_WORKER === 'off') return;
  const settings = outboxSettings();
  mailWorkerId = await boss.work<{ outboxId: string }>(
    queueName('mail'),
    { batchSize: settings.batchSize, pollingIntervalSeconds: Math.max(0.5, settings.pollMs / 1000) },
    async (jobs) => {
      // Each message on its own: one refusal must not fail the others of the batch.
      for (const job of jobs) await deliverMessage(job.data.outboxId);
    },
  );
});

/** Starts this process's job queue and workers (mail included) once. Set OUTBOX_WORKER=off for no mail worker. */
export function ensureOutboxWorker(): void {
  void startJobs().catch(() => {});
}

/**
 * Asks this process's mail worker to look now (after a commit that queued mail). Only where the
 * queue runs already (a server); a script (the demo seed) only queues, and a server sends.
 */
export function wakeOutboxWorker(): void {
  void runningJobs()
    ?.then((boss) => {
      if (mailWorkerId) boss.notifyWorker(mailWorkerId);
    })
    .catch(() => {});
}

export interface OutboxMessageStatus {
  id: string;
  kind: string;
  to: string[];
  subject: string;
  status: 'queued' | 'sending' | 'sent' | 'failed';
  attempts: number;
  nextAttemptAt: string | null;
  lastError: string | null;
  createdAt: string;
  sentAt: string | null;
}

/** The columns a message's status is read from (statusOf). */
const statusColumns = [
  'id',
  'kind',
  'to_addresses',
  'subject',
  'status',
  'attempts',
  'next_attempt_at',
  'last_error',
  'created_at',
  'sent_at',
] as const;

interface StatusRow {
  id: string;
  kind: string;
  to_addresses: string[];
  subject: string;
  status: OutboxMessageStatus['status'];
  attempts: number;
  next_attempt_at: Date;
  last_error: string | null;
  created_at: Date;
  sent_at: Date | null;
}

/** A message's status as the UI and API show it: a sent or failed one has no next attempt. */
function statusOf(r: StatusRow): OutboxMessageStatus {
  return {
    id: r.id,
    kind: r.kind,
    to: r.to_addresses,
    subject: r.subject,
    status: r.status,
    attempts: r.attempts,
    nextAttemptAt:
      r.status === 'sent' || r.status === 'failed' ? null : new Date(r.next_attempt_at).toISOString(),
    lastError: r.last_error,
    createdAt: new Date(r.created_at).toISOString(),
    sentAt: r.sent_at ? new Date(r.sent_at).toISOString() : null,
  };
}

/** Messages about one record (e.g. an assessment), newest first, for the UI and API. */
export async function messagesAbout(
  knex: Knex,
  organisationId: string,
  relatedType: string,
  relatedId: string,
): Promise<OutboxMessageStatus[]> {
  const rows = await knex('outbox_messages')
    .where({ organisation_id: organisationId, related_type: relatedType, related_id: relatedId })
    .orderBy('created_at', 'desc')
    .select<StatusRow[]>(statusColumns);
  return rows.map(statusOf);
}

export interface UndeliveredMessage extends OutboxMessageStatus {
  relatedType: string | null;
  relatedId: string | null;
}

/**
 * The organisation's mail that has not gone out: refused at least once and still waiting, or
 * given up on. A message not tried yet is on its way, not undelivered. Newest first.
 */
export async function undeliveredMessages(
  knex: Knex,
  organisationId: string,
  limit = 20,
): Promise<{ items: UndeliveredMessage[]; total: number }> {
  const base = () =>
    knex('outbox_messages')
      .where({ organisation_id: organisationId })
      .andWhere((w) =>
        w
          .where('status', 'failed')
          .orWhere((q) => q.whereIn('status', ['queued', 'sending']).andWhere('attempts', '>', 0)),
      );
  const [rows, [{ n }]] = await Promise.all([
    base()
      .orderBy('created_at', 'desc')
      .limit(limit)
      .select<(StatusRow & { related_type: string | null; related_id: string | null })[]>([
        ...statusColumns,
        'related_type',
        'related_id',
      ]),
    base().count<{ n: string }[]>({ n: '*' }),
  ]);
  return {
    total: Number(n),
    items: rows.map((r) => ({ ...statusOf(r), relatedType: r.related_type, relatedId: r.related_id })),
  };
}
