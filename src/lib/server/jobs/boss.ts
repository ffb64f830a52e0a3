/**
 * The background job queue: pg-boss on this product's PostgreSQL, schema `pgboss` (made by the
 * migration db/migrations/20261204170000_job_queue.ts; the server starts pg-boss with
 * `migrate: false`). It runs on the server's own Knex pool, so it connects as the same role.
 *
 * Every server process starts the queue on its first request (src/integrations/outbox-worker.ts
 * adds the middleware) and works the queues of its channel (OUTBOX_CHANNEL, `default`): any
 * number of instances share the work; a job is fetched by one of them only (`SKIP LOCKED`).
 *
 * Queues (`<name>.<channel>`; the set and their options are fixed by the migration's
 * `pgboss.latchwell_ensure_queues`):
 * - `mail`: one outbox message to send (outbox.ts); `mail-dead`: messages given up on.
 * - `reinspection-sweep`: the hourly scheduled look for organisations due their daily reminders;
 *   `reinspection-reminders`: one organisation's reminders for one day (reinspection-schedule.ts).
 * - `impact-slice`: one slice of a ruleset impact run (impact-runs.ts).
 * Every job's data carries `organisationId` (null only for the sweep), which the owner's jobs
 * page filters by.
 */
import type { Knex } from 'knex';
import PgBoss from 'pg-boss';
import { db } from '../db';

export const queueBases = [
  'mail',
  'mail-dead',
  'reinspection-sweep',
  'reinspection-reminders',
  'impact-slice',
] as const;
export type QueueBase = (typeof queueBases)[number];

/** The group of servers that share background work (OUTBOX_CHANNEL, default `default`). */
export function jobChannel(): string {
  const channel = (process.env.OUTBOX_CHANNEL ?? 'default').trim().toLowerCase();
  return /^[a-z0-9][a-z0-9_-]{0,39}$/.test(channel) ? channel : 'default';
}

export const queueName = (base: QueueBase, channel = jobChannel()) => `${base}.${channel}`;

/** The queue base of a stored job's name (`mail.default` → `mail`), or null for pg-boss's own. */
export function baseOf(name: string): QueueBase | null {
  const base = name.slice(0, name.lastIndexOf('.'));
  return (queueBases as readonly string[]).includes(base) ? (base as QueueBase) : null;
}

/** pg-boss's database access over a Knex instance or transaction (the latter sends inside it). */
export function bossDb(knex: Knex | Knex.Transaction): PgBoss.Db {
  return {
    async executeSql(text: string, values: unknown[]) {
      const connection = await knex.client.acquireConnection();
      try {
        return await connection.query(text, values);
      } finally {
        await knex.client.releaseConnection(connection);
      }
    },
  };
}

let boss: PgBoss | undefined;
let started: Promise<PgBoss> | undefined;
const ensuredChannels = new Set<string>();

/** This process's pg-boss (not started: sending needs no start). */
export function jobBoss(): PgBoss {
  boss ??= new PgBoss({
    // Resolved at each query: constructing the queue must not need DATABASE_URL (the CLI sends
    // inside its own transactions).
    db: { executeSql: (text: string, values: unknown[]) => bossDb(db()).executeSql(text, values) },
    schema: 'pgboss',
    migrate: false,
    // Completed jobs leave the live table after an hour; failed ones stay a week for the jobs page.
    archiveCompletedAfterSeconds: 3600,
    archiveFailedAfterSeconds: 7 * 24 * 3600,
  });
  return boss;
}

/** Creates this channel's queues if a new channel is used (idempotent; see the migration). */
export async function ensureQueues(
  knex: Knex | Knex.Transaction = db(),
  channel = jobChannel(),
): Promise<void> {
  if (ensuredChannels.has(channel)) return;
  await knex.raw('select pgboss.latchwell_ensure_queues(?)', [channel]);
  ensuredChannels.add(channel);
}

export interface SendJobOptions {
  /** Send inside this transaction: the job exists exactly when the transaction commits. */
  trx?: Knex.Transaction;
  startAfter?: Date;
  singletonKey?: string;
  singletonSeconds?: number;
  retryLimit?: number;
  retryDelay?: number;
  retryBackoff?: boolean;
  expireInSeconds?: number;
}

/** Queues one job on this channel's `base` queue; answers its id (null when a singleton already exists). */
export async function sendJob(
  base: QueueBase,
  data: { organisationId: string | null } & Record<string, unknown>,
  options: SendJobOptions = {},
): Promise<string | null> {
  const { trx, ...rest } = options;
  await ensureQueues(trx ?? db());
  const sendOptions: PgBoss.SendOptions = Object.fromEntries(
    Object.entries(rest).filter(([, v]) => v !== undefined),
  );
  if (trx) sendOptions.db = bossDb(trx);
  return jobBoss().send(queueName(base), data, sendOptions);
}

type Starter = (boss: PgBoss) => Promise<void>;
const starters: Starter[] = [];

/** Registers what this process runs once the queue has started (workers, schedules). */
export function onJobsStarted(starter: Starter): void {
  starters.push(starter);
}

/** Starts pg-boss and this process's workers once; later calls answer the same promise. */
export function startJobs(): Promise<PgBoss> {
  started ??= (async () => {
    const instance = jobBoss();
    instance.on('error', (error: Error) => console.warn('[jobs]', error.message));
    await ensureQueues();
    await instance.start();
    for (const starter of starters) await starter(instance);
    return instance;
  })();
  started.catch((error) => {
    console.warn('[jobs] could not start:', error instanceof Error ? error.message : error);
    started = undefined; // the next request tries again
  });
  return started;
}

/** This process's running queue, if it was started (CLI scripts send jobs but never start it). */
export function runningJobs(): Promise<PgBoss> | undefined {
  return started;
}

export async function stopJobs(): Promise<void> {
  const running = started;
  started = undefined;
  if (running) await (await running).stop({ graceful: true, close: false, timeout: 5000 });
}
