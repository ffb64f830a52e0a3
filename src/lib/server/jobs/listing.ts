/**
 * The owner's view of the organisation's background jobs (/jobs): what is queued, running,
 * failed or dead (mail given up on), with retry. Jobs are the organisation's when their data
 * says so (`organisationId`, set by sendJob's callers); another organisation's job is not found.
 */
import type { Knex } from 'knex';
import type { JobList, JobStatus, JobSummary } from '@/lib/api/jobs';
import { formatCalendarDate } from '@/lib/vocabulary';
import { db } from '../db';
import { requeueFailedMessage } from '../outbox';
import { baseOf, jobBoss, queueBases, type QueueBase } from './boss';

export type { JobStatus, JobSummary } from '@/lib/api/jobs';

const QUEUE_WORDS: Record<QueueBase, string> = {
  mail: 'E-mail',
  // The status beside it already says "Given up".
  'mail-dead': 'E-mail',
  'reinspection-sweep': 'Reminder sweep',
  'reinspection-reminders': 'Re-inspection reminders',
  'impact-slice': 'Ruleset impact',
};
export const queueWords = (queue: QueueBase) => QUEUE_WORDS[queue];

/** Our queues on any channel: `mail.default`, `impact-slice.staging`, … */
const ourQueues = `^(${queueBases.map((b) => b.replace(/[-.]/g, '\\$&')).join('|')})\\.[a-z0-9][a-z0-9_-]*$`;

interface JobRow {
  id: string;
  name: string;
  state: 'created' | 'retry' | 'active' | 'completed' | 'cancelled' | 'failed';
  data: Record<string, unknown> | null;
  output: { message?: string } | null;
  created_on: Date;
  start_after: Date;
  started_on: Date | null;
  retry_count: number;
  subject: string | null;
  impact_version: string | null;
}

function statusOf(row: JobRow, queue: QueueBase): JobStatus {
  if (queue === 'mail-dead') return 'dead';
  if (row.state === 'active') return 'running';
  if (row.state === 'failed') return 'failed';
  return 'queued';
}

function jobsQuery(knex: Knex, organisationId: string) {
  return knex('pgboss.job as j')
    .leftJoin('outbox_messages as o', (on) =>
      on.on(knex.raw(`o.id::text = j.data ->> 'outboxId'`)).andOnVal('o.organisation_id', organisationId),
    )
    .whereRaw(`j.data ->> 'organisationId' = ?`, [organisationId])
    .whereRaw('j.name ~ ?', [ourQueues])
    .whereIn('j.state', ['created', 'retry', 'active', 'failed']);
}

/** The organisation's jobs that are not done, newest first (at most `limit`), and the counts by status. */
export async function listJobs(organisationId: string, limit = 200, knex: Knex = db()): Promise<JobList> {
  // An impact slice's spec (up to IMPACT_SLICE_SIZE assessment ids) stays in the database.
  const rows = (await jobsQuery(knex, organisationId)
    .orderBy('j.created_on', 'desc')
    .limit(limit)
    .select(
      'j.id',
      'j.name',
      'j.state',
      knex.raw(`j.data - 'spec' as data`),
      'j.output',
      'j.created_on',
      'j.start_after',
      'j.started_on',
      'j.retry_count',
      'o.subject',
      knex.raw(
        `j.data -> 'target' ->> 'family' || ' ' || (j.data -> 'target' ->> 'version') as impact_version`,
      ),
    )) as JobRow[];
  const counted = (await jobsQuery(knex, organisationId)
    .groupBy('j.name', 'j.state')
    .select('j.name', 'j.state', knex.raw('count(*)::int as n'))) as {
    name: string;
    state: string;
    n: number;
  }[];
  const counts: Record<JobStatus, number> = { queued: 0, running: 0, failed: 0, dead: 0 };
  for (const c of counted) {
    const queue = baseOf(c.name);
    if (queue) counts[statusOf({ state: c.state } as JobRow, queue)] += c.n;
  }
  const items = rows.flatMap((row): JobSummary[] => {
    const queue = baseOf(row.name);
    if (!queue) return [];
    const status = statusOf(row, queue);
    const about =
      queue === 'mail' || queue === 'mail-dead'
        ? (row.subject ?? 'A message')
        : queue === 'impact-slice'
          ? `${row.impact_version ?? 'A ruleset version'}, slice ${Number(row.data?.slice ?? 0) + 1} of ${Number(row.data?.slices ?? 1)}`
          : queue === 'reinspection-reminders'
            ? typeof row.data?.day === 'string'
              ? `Reminders for ${formatCalendarDate(row.data.day)}`
              : 'Reminders for today'
            : QUEUE_WORDS[queue];
    const error =
      status === 'dead'
        ? String(row.data?.lastError ?? '') || null
        : status === 'failed'
          ? (row.output?.message ?? null)
          : null;
    return [
      {
        id: row.id,
        queue,
        queueLabel: QUEUE_WORDS[queue],
        status,
        about,
        createdAt: new Date(row.created_on).toISOString(),
        startAfter: new Date(row.start_after).toISOString(),
        startedAt: row.started_on ? new Date(row.started_on).toISOString() : null,
        retryCount: row.retry_count,
        error: error ? error.slice(0, 500) : null,
        canRetry: status === 'failed' || status === 'dead',
      },
    ];
  });
  return { items, counts };
}

export type RetryOutcome = 'retried' | 'not_found' | 'not_retryable';

/**
 * Sends a failed or dead job round again: a failed job goes back to its queue (pg-boss retry);
 * a dead message is queued for delivery afresh and leaves the dead-letter queue.
 */
export async function retryJob(
  organisationId: string,
  jobId: string,
  knex: Knex = db(),
): Promise<RetryOutcome> {
  const row = (await knex('pgboss.job')
    .where({ id: jobId })
    .whereRaw(`data ->> 'organisationId' = ?`, [organisationId])
    .whereRaw('name ~ ?', [ourQueues])
    .whereIn('state', ['created', 'retry', 'active', 'failed'])
    .first('id', 'name', 'state', 'data')) as Pick<JobRow, 'id' | 'name' | 'state' | 'data'> | undefined;
  const queue = row && baseOf(row.name);
  if (!row || !queue) return 'not_found';
  if (queue === 'mail-dead') {
    const outboxId = String(row.data?.outboxId ?? '');
    // Refused after the delete: the transaction rolls back, so the dead job stays listed.
    const refused = new Error('not retryable');
    return knex
      .transaction(async (trx): Promise<RetryOutcome> => {
        const deleted = await trx('pgboss.job').where({ name: row.name, id: row.id }).delete();
        if (!deleted) return 'not_found';
        // The row's organisation was checked through the job; the message must be the same one's.
        const mine = await trx('outbox_messages')
          .where({ id: outboxId, organisation_id: organisationId })
          .first('id');
        if (!mine || !(await requeueFailedMessage(trx, outboxId))) throw refused;
        return 'retried';
      })
      .catch((error: unknown) => {
        if (error === refused) return 'not_retryable' as const;
        throw error;
      });
  }
  if (row.state !== 'failed') return 'not_retryable';
  // pg-boss answers { affected } here, though its types say nothing.
  const result = (await jobBoss().retry(row.name, row.id)) as unknown as { affected?: number } | undefined;
  return result?.affected ? 'retried' : 'not_retryable';
}
