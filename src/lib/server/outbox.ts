/**
 * The mail outbox. A message is a row written in the same transaction as the change it
 * announces, so it exists exactly when the change does; a worker inside the server process
 * sends it later through nodemailer. While SMTP is unreachable nothing is lost: the row stays
 * `queued` with a growing back-off and goes out when SMTP answers again.
 *
 * Claiming uses `FOR UPDATE SKIP LOCKED`, so several server processes can run workers side by
 * side without sending a message twice. A claimed row is leased (`sending` with a lease end in
 * next_attempt_at); a process that dies mid-send leaves a lease that expires and is reclaimed.
 *
 * Where the worker runs: `src/integrations/outbox-worker.ts` adds a tiny middleware that starts
 * it on the first request any server process handles (every launcher polls /api/health at
 * boot), and the endpoints that queue mail wake it at once after their commit.
 */
import type { Knex } from 'knex';
import { db } from './db';
import { mailTransport } from './mail/transport';
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

/** The group of workers that delivers this process's mail (OUTBOX_CHANNEL, default `default`). */
export function outboxChannel(): string {
  const channel = (process.env.OUTBOX_CHANNEL ?? 'default').trim().toLowerCase();
  return /^[a-z0-9][a-z0-9_-]{0,39}$/.test(channel) ? channel : 'default';
}

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

/** Queues a message inside the caller's transaction; returns its id. */
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
  return row.id;
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
  kind: string;
  to_addresses: string[];
  cc_addresses: string[];
  subject: string;
  text_body: string;
  html_body: string | null;
  attachments: OutboxAttachment[];
  attempts: number;
}

/** Leases up to `limit` due messages to this worker and counts the attempt. */
export async function claimDueMessages(knex: Knex, settings: OutboxSettings): Promise<ClaimedMessage[]> {
  return knex.transaction(async (trx): Promise<ClaimedMessage[]> => {
    const due = await trx('outbox_messages')
      .where('channel', outboxChannel())
      .whereIn('status', ['queued', 'sending'])
      .andWhere('next_attempt_at', '<=', trx.fn.now())
      .orderBy('next_attempt_at')
      .limit(settings.batchSize)
      .forUpdate()
      .skipLocked()
      .select('id');
    if (!due.length) return [];
    return trx('outbox_messages')
      .whereIn(
        'id',
        due.map((d) => d.id),
      )
      .update({
        status: 'sending',
        attempts: trx.raw('attempts + 1'),
        next_attempt_at: trx.raw(`now() + (? * interval '1 millisecond')`, [settings.leaseMs]),
      })
      .returning([
        'id',
        'kind',
        'to_addresses',
        'cc_addresses',
        'subject',
        'text_body',
        'html_body',
        'attachments',
        'attempts',
      ]) as Promise<ClaimedMessage[]>;
  });
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

export interface DeliveryReport {
  sent: number;
  retried: number;
  failed: number;
}

/** One pass: claim what is due, send it, record the outcome. */
export async function deliverDueMessages(
  knex: Knex = db(),
  settings = outboxSettings(),
): Promise<DeliveryReport> {
  const report: DeliveryReport = { sent: 0, retried: 0, failed: 0 };
  const claimed = await claimDueMessages(knex, settings);
  for (const message of claimed) {
    try {
      await sendOne(message);
      const redacted = oneTimeLinkKinds.includes(message.kind)
        ? { text_body: sentLinkNote, html_body: null }
        : {};
      await knex('outbox_messages')
        .where({ id: message.id })
        .update({ status: 'sent', sent_at: knex.fn.now(), last_error: null, ...redacted });
      report.sent++;
    } catch (error) {
      const lastError = (error instanceof Error ? error.message : String(error)).slice(0, 1000);
      if (message.attempts >= settings.maxAttempts) {
        await knex('outbox_messages')
          .where({ id: message.id })
          .update({ status: 'failed', last_error: lastError });
        report.failed++;
      } else {
        const delay = retryDelayMs(message.attempts, settings);
        await knex('outbox_messages')
          .where({ id: message.id })
          .update({
            status: 'queued',
            last_error: lastError,
            next_attempt_at: knex.raw(`now() + (? * interval '1 millisecond')`, [delay]),
          });
        report.retried++;
      }
    }
  }
  return report;
}

interface WorkerState {
  timer: NodeJS.Timeout;
  running: boolean;
  again: boolean;
}

let worker: WorkerState | undefined;

async function tick(): Promise<void> {
  if (!worker) return;
  if (worker.running) {
    worker.again = true;
    return;
  }
  worker.running = true;
  try {
    do {
      worker.again = false;
      const report = await deliverDueMessages();
      // A full batch may mean more are waiting: go again at once.
      if (report.sent + report.retried + report.failed >= outboxSettings().batchSize) worker.again = true;
    } while (worker.again);
  } catch (error) {
    // The database being briefly away is not worth a stack trace every poll.
    console.warn('[outbox] delivery pass failed:', error instanceof Error ? error.message : error);
  } finally {
    worker.running = false;
  }
}

/** Starts this process's worker once; later calls do nothing. Set OUTBOX_WORKER=off to disable. */
export function ensureOutboxWorker(): void {
  if (worker || process.env.OUTBOX_WORKER === 'off') return;
  const timer = setInterval(() => void tick(), outboxSettings().pollMs);
  timer.unref();
  worker = { timer, running: false, again: false };
  void tick();
}

/** Asks the worker to look now (after a commit that queued mail). */
export function wakeOutboxWorker(): void {
  ensureOutboxWorker();
  void tick();
}

export function stopOutboxWorker(): void {
  if (worker) clearInterval(worker.timer);
  worker = undefined;
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
    .select(
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
    );
  return rows.map((r) => ({
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
  }));
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
      .select(
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
        'related_type',
        'related_id',
      ),
    base().count<{ n: string }[]>({ n: '*' }),
  ]);
  return {
    total: Number(n),
    items: rows.map((r) => ({
      id: r.id,
      kind: r.kind,
      to: r.to_addresses,
      subject: r.subject,
      status: r.status,
      attempts: r.attempts,
      nextAttemptAt: r.status === 'failed' ? null : new Date(r.next_attempt_at).toISOString(),
      lastError: r.last_error,
      createdAt: new Date(r.created_at).toISOString(),
      sentAt: null,
      relatedType: r.related_type,
      relatedId: r.related_id,
    })),
  };
}
