/**
 * Ruleset impact runs on the job queue. Publishing a version (an organisation's own, or a
 * shipped one for each organisation with signed assessments of its family) queues a run; so can
 * the impact page. A run is cut into slices when it is queued (impact.ts `slicesOf`: the ids of
 * the assessments to re-score, found with one statement per version, IMPACT_SLICE_SIZE each) and
 * each slice is one `impact-slice` job, carrying its ids, that any server instance of the channel
 * takes, scores (impact.ts `rescoreSlice`: its rows by primary key) and adds into the run's row:
 * counts, the most severe worse outcomes, progress. More instances, more slices at once. A run
 * re-scores the assessments that were to be re-scored when it was queued.
 *
 * A slice job that runs twice (an instance died after adding its counts) is counted once
 * (`done_slices`). A slice that fails after its retries marks the run failed; the owner's jobs
 * page can retry it, and the run completes when it succeeds.
 */
import os from 'node:os';
import type { Knex } from 'knex';
import type {
  ImpactBasis,
  ImpactOutcome,
  ImpactReport,
  ImpactRunProgress,
  ImpactRunView,
  ImpactTarget,
} from '@/lib/api/impact';
import { organisationsSignedUnderOtherVersions } from './assessments';
import { db } from './db';
import {
  impactModuleUrl,
  impactTarget,
  rescoreSlice,
  slicesOf,
  worseFirst,
  type ImpactSlice,
} from './impact';
import { acquireSharedPool, releaseSharedPool, workerCount, type RescorePool } from './impact-workers';
import { onJobsStarted, queueName, sendJob } from './jobs/boss';
import { iso } from './listing';

const ITEM_LIMIT = 500;
const instanceName = `${os.hostname()}:${process.pid}`;

interface RunRow {
  id: string;
  organisation_id: string;
  version_id: string;
  basis: ImpactBasis;
  reason: ImpactRunProgress['reason'];
  status: ImpactRunProgress['status'];
  slices_total: number;
  slices_done: number;
  considered: number;
  worse: number;
  better: number;
  same: number;
  unscorable: number;
  items: ImpactOutcome[];
  truncated: boolean;
  unscorable_samples: ImpactReport['unscorableSamples'];
  instances: string[];
  last_error: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
}

/**
 * Queues a run of `target` for the organisation: the run's row and one job per slice, in one
 * transaction (a run with nothing to score is done at once). Answers the run's id.
 */
export async function startImpactRun(
  organisationId: string,
  target: ImpactTarget,
  basis: ImpactBasis,
  reason: ImpactRunProgress['reason'],
  knex: Knex = db(),
): Promise<string> {
  const slices: ImpactSlice[] = [];
  for await (const slice of slicesOf(knex, organisationId, target, basis)) slices.push(slice);
  return knex.transaction(async (trx) => {
    const [run] = await trx('impact_runs')
      .insert({
        organisation_id: organisationId,
        version_id: target.id,
        basis,
        reason,
        slices_total: slices.length,
        status: slices.length ? 'queued' : 'done',
        finished_at: slices.length ? null : trx.fn.now(),
      })
      .returning('id');
    for (const [index, slice] of slices.entries())
      await sendJob(
        'impact-slice',
        {
          organisationId,
          runId: run.id,
          slice: index,
          slices: slices.length,
          target: { family: target.family, version: target.version },
          spec: slice,
        },
        { trx },
      );
    return run.id as string;
  });
}

/**
 * After a version is published: a run for each organisation that has signed assessments under
 * another version of the family (for an organisation's own family, just that organisation).
 */
export async function queueImpactAfterPublish(versionId: string, knex: Knex = db()): Promise<number> {
  const version = await knex('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where('rv.id', versionId)
    .first('r.id as ruleset_id', 'r.organisation_id');
  if (!version) return 0;
  const organisations = await organisationsSignedUnderOtherVersions(
    knex,
    version.ruleset_id,
    versionId,
    version.organisation_id,
  );
  let queued = 0;
  for (const organisationId of organisations) {
    const target = await impactTarget(organisationId, versionId, knex);
    if (!target) continue;
    await startImpactRun(organisationId, target, 'latest', 'published', knex);
    queued++;
  }
  return queued;
}

/** Adds one scored slice into its run; a slice already counted is skipped. */
async function addSlice(
  runId: string,
  index: number,
  outcomes: ImpactOutcome[],
  knex: Knex = db(),
): Promise<void> {
  await knex.transaction(async (trx) => {
    const run = (await trx('impact_runs').where({ id: runId }).forUpdate().first()) as
      (RunRow & { done_slices: number[] }) | undefined;
    if (!run || run.done_slices.includes(index)) return;
    const counts = { considered: 0, worse: 0, better: 0, same: 0, unscorable: 0 };
    const samples = [...run.unscorable_samples];
    for (const o of outcomes) {
      counts.considered++;
      counts[o.change]++;
      if (o.change === 'unscorable' && samples.length < 10)
        samples.push({ assessmentId: o.assessmentId, gateLabel: o.gateLabel, problem: o.problem });
    }
    const items = [...run.items, ...outcomes.filter((o) => o.change === 'worse')].sort(worseFirst);
    const done = run.slices_done + 1;
    await trx('impact_runs')
      .where({ id: runId })
      .update({
        considered: run.considered + counts.considered,
        worse: run.worse + counts.worse,
        better: run.better + counts.better,
        same: run.same + counts.same,
        unscorable: run.unscorable + counts.unscorable,
        items: JSON.stringify(items.slice(0, ITEM_LIMIT)),
        truncated: run.worse + counts.worse > ITEM_LIMIT,
        unscorable_samples: JSON.stringify(samples),
        slices_done: done,
        done_slices: trx.raw('array_append(done_slices, ?::int)', [index]),
        instances: trx.raw(
          'case when ? = any(instances) then instances else array_append(instances, ?::text) end',
          [instanceName, instanceName],
        ),
        status: done >= run.slices_total ? 'done' : 'running',
        started_at: run.started_at ?? trx.fn.now(),
        finished_at: done >= run.slices_total ? trx.fn.now() : null,
        last_error: done >= run.slices_total ? null : run.last_error,
      });
  });
}

export interface SliceJob {
  organisationId: string;
  runId: string;
  slice: number;
  slices: number;
  spec: ImpactSlice;
}

/**
 * Slices this instance takes at once (IMPACT_CONCURRENCY, 1–16): by default two per thread (two
 * for the request thread), so each thread scores one slice while the next one's rows come from
 * the database, as the in-process report keeps two slices per thread in flight.
 * (Measured on two shared cores, load average 10–13, 10,000 assessments in slices of 1,000, one
 * thread: one slice at a time 13.5–13.8 s from queued to done, two at once 7.2–10.5 s.)
 */
export function impactConcurrency(threads = workerCount(1)): number {
  const configured = Number(process.env.IMPACT_CONCURRENCY);
  if (Number.isFinite(configured) && configured >= 1) return Math.min(16, Math.floor(configured));
  return 2 * Math.max(1, threads);
}

/** Scores one queued slice and adds it into its run; a failure is recorded on the run, and the job retried. */
export async function workSlice(
  job: { data: SliceJob; retryCount: number; retryLimit: number },
  pool?: RescorePool | null,
): Promise<void> {
  const { runId, slice, spec } = job.data;
  // This instance's re-scoring threads (impact-workers.ts), shared with the reports asked for over HTTP.
  const threads = pool === undefined ? await acquireSharedPool(impactModuleUrl) : pool;
  try {
    await db()('impact_runs')
      .where({ id: runId, status: 'queued' })
      .update({ status: 'running', started_at: db().fn.now() });
    await addSlice(runId, slice, threads ? await threads.run(spec) : await rescoreSlice(spec));
  } catch (error) {
    const message = (error instanceof Error ? error.message : String(error)).slice(0, 1000);
    const last = job.retryCount >= job.retryLimit;
    await db()('impact_runs')
      .where({ id: runId })
      .update({ last_error: message, ...(last ? { status: 'failed' } : {}) });
    throw error;
  } finally {
    if (pool === undefined) releaseSharedPool();
  }
}

onJobsStarted(async (boss) => {
  if (process.env.IMPACT_QUEUE_WORKER === 'off') return;
  for (let i = 0; i < impactConcurrency(); i++)
    await boss.work<SliceJob>(
      queueName('impact-slice'),
      { batchSize: 1, pollingIntervalSeconds: 0.5, includeMetadata: true },
      async ([job]) => {
        if (job) await workSlice(job);
      },
    );
});

function progressOf(row: RunRow): ImpactRunProgress {
  return {
    id: row.id,
    status: row.status,
    reason: row.reason,
    slicesTotal: row.slices_total,
    slicesDone: row.slices_done,
    instances: row.instances.length,
    createdAt: iso(row.created_at),
    startedAt: row.started_at ? iso(row.started_at) : null,
    finishedAt: row.finished_at ? iso(row.finished_at) : null,
    lastError: row.last_error,
  };
}

/** The latest run of this version and basis for the organisation, and its report so far. */
export async function latestImpactRun(
  organisationId: string,
  target: ImpactTarget,
  basis: ImpactBasis,
  knex: Knex = db(),
): Promise<ImpactRunView> {
  const row = (await knex('impact_runs')
    .where({ organisation_id: organisationId, version_id: target.id, basis })
    .orderBy('created_at', 'desc')
    .first()) as RunRow | undefined;
  if (!row) return { run: null, report: null };
  const { otherVersions, ...rest } = target;
  const end = row.finished_at ?? new Date();
  return {
    run: progressOf(row),
    report: {
      target: { ...rest, comparedWith: otherVersions.map((v) => v.version) },
      basis,
      considered: row.considered,
      worse: row.worse,
      better: row.better,
      same: row.same,
      unscorable: row.unscorable,
      items: row.items,
      truncated: row.truncated,
      unscorableSamples: row.unscorable_samples,
      workers: row.instances.length,
      durationMs: row.started_at
        ? Math.max(0, new Date(end).getTime() - new Date(row.started_at).getTime())
        : 0,
    },
  };
}
