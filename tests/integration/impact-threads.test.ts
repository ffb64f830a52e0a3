/**
 * Queued impact slices scored in re-scoring threads: a slice scored in a thread finds exactly
 * what the engine finds in this thread, and a slice whose scoring throws in its thread is
 * retried, then failed on the queue, on the run and on the owner's jobs page (never lost).
 */
import { randomUUID } from 'node:crypto';
import PgBoss from 'pg-boss';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer } from '../../src/cli/services';
import type { ImpactOutcome, ImpactRunView } from '../../src/lib/api/impact';
import type { JobList } from '../../src/lib/api/jobs';
import { startRescorePool, type RescorePool } from '../../src/lib/server/impact-workers';
import { scoreParsed } from '../../src/lib/rules';
import { buildEngineInput } from '../../src/lib/server/assessment-input';
import {
  createPrng,
  sampleDocuments,
  sampleGate,
  type SampleDocuments,
  type SampleGate,
} from '../support/archive-samples';
import {
  addClient,
  addGate,
  addSite,
  expectJson,
  fileAssessment,
  publishedVersion,
  type PublishedVersion,
} from './support/archive';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
} from './support/fixtures';
import { bossDb } from '../../src/lib/server/jobs/boss';

let org: FixtureOrganisation;
let v2015: PublishedVersion;
let v2026: PublishedVersion;
let pool: RescorePool | null = null;
// The modules under test read DATABASE_URL when they first connect (threads copy it when started).
process.env.DATABASE_URL = inject('databaseUrl');
const impact = await import('../../src/lib/server/impact');
const runs = await import('../../src/lib/server/impact-runs');
const { closeDatabase } = await import('../../src/lib/server/db');

beforeAll(async () => {
  org = await createOrganisation('impact-threads');
  [v2015, v2026] = await Promise.all([
    publishedVersion('north-american-gate', '2015.1'),
    publishedVersion('north-american-gate', '2026.1'),
  ]);
  // Twenty gates with generated walk-through records signed under 2015.1: eight that 2026.1 scores
  // worse and twelve that it does not (decided by the same engine, as the shipped rulesets change).
  const prng = createPrng(4242);
  const verdictUnder = (
    version: PublishedVersion,
    gate: SampleGate,
    documents: SampleDocuments,
    usageClass: number,
  ) => {
    const built = buildEngineInput({ ...gate, usageClass } as never, documents as never);
    return built.ok ? scoreParsed(built.value, version.loaded).verdict : null;
  };
  const rank = { clear: 0, remedy: 1, withdraw: 2 } as const;
  const picked: { gate: SampleGate; documents: SampleDocuments; usageClass: number }[] = [];
  let worse = 0;
  for (let i = 0; i < 5000 && picked.length < 20; i++) {
    const usageClass = 1 + (i % 4);
    const gate = sampleGate(prng);
    const documents = sampleDocuments(prng, v2015.loaded.version);
    const before = verdictUnder(v2015, gate, documents, usageClass);
    const after = verdictUnder(v2026, gate, documents, usageClass);
    if (!before || !after) continue;
    const gotWorse = rank[after] > rank[before];
    if (gotWorse ? worse >= 8 : picked.length - worse >= 12) continue;
    if (gotWorse) worse++;
    picked.push({ gate, documents, usageClass });
  }
  if (picked.length < 20) throw new Error('could not generate records that 2026.1 scores worse and the same');
  const client = await addClient(org.id, 'Harrow Quarry Residents');
  for (const [i, { gate, documents, usageClass }] of picked.entries()) {
    const site = await addSite(org.id, client, `${i + 1} Tollbar Yard`, 'Greyford', usageClass);
    const gateId = await addGate(org.id, site, `Gate ${i + 1}`, gate);
    await fileAssessment({
      organisationId: org.id,
      auditorId: org.auditor.id,
      gateId,
      gate,
      usageClass,
      version: v2015,
      documents,
      visitedOn: `2025-0${1 + (i % 9)}-1${i % 10}T09:00:00Z`,
    });
  }
});

afterAll(async () => {
  await pool?.close();
  await closeDatabase();
});

async function sliceOfAll() {
  const target = await impact.impactTarget(org.id, v2026.id, testDb());
  const slices = [];
  for await (const slice of impact.slicesOf(testDb(), org.id, target!, 'all')) slices.push(slice);
  expect(slices).toHaveLength(1); // 20 assessments, slices of 1,000
  return slices[0]!;
}

describe('queued impact slices in re-scoring threads', () => {
  it('score a slice in a thread with the same findings as the engine in this thread, and add it to the run once', async () => {
    const slice = await sliceOfAll();
    const here = await impact.rescoreSlice(slice, testDb());
    pool = await startRescorePool(impact.impactModuleUrl, 1);
    expect(pool).not.toBeNull();
    const there = await pool!.run(slice);
    expect(there).toHaveLength(20);
    expect(there).toEqual(here);
    // Something to compare: eight worse, with the rules responsible; the rest not.
    expect(here.filter((o: ImpactOutcome) => o.change === 'worse')).toHaveLength(8);
    expect(here.some((o) => o.change === 'worse' && o.rules.length > 0)).toBe(true);

    // Through the queue's handler, twice (an instance that died after adding): counted once.
    const [run] = await testDb()('impact_runs')
      .insert({
        organisation_id: org.id,
        version_id: v2026.id,
        basis: 'all',
        reason: 'requested',
        slices_total: 1,
        status: 'queued',
      })
      .returning('id');
    const job = {
      data: { organisationId: org.id, runId: run.id, slice: 0, slices: 1, spec: slice },
      retryCount: 0,
      retryLimit: 2,
    };
    await runs.workSlice(job, pool);
    await runs.workSlice(job, pool);
    const row = await testDb()('impact_runs').where({ id: run.id }).first();
    const count = (change: string) => here.filter((o) => o.change === change).length;
    expect(row).toMatchObject({
      status: 'done',
      slices_done: 1,
      considered: 20,
      worse: count('worse'),
      same: count('same'),
      better: count('better'),
      unscorable: count('unscorable'),
    });
    expect(row.items.map((o: ImpactOutcome) => o.assessmentId).sort()).toEqual(
      here
        .filter((o) => o.change === 'worse')
        .map((o) => o.assessmentId)
        .sort(),
    );
  }, 90_000);

  it('retry a slice whose scoring throws in its thread, then show it failed on the run and the jobs page', async () => {
    const slice = await sliceOfAll();
    const channel = `threads-${Date.now().toString(36)}`;
    const server = await startAppServer({
      port: await freePort(),
      quiet: true,
      env: { ...inject('serverEnv'), OUTBOX_CHANNEL: channel, OUTBOX_WORKER: 'off', IMPACT_WORKERS: '1' },
    });
    try {
      const [run] = await testDb()('impact_runs')
        .insert({
          organisation_id: org.id,
          version_id: v2026.id,
          basis: 'latest',
          reason: 'requested',
          slices_total: 1,
          status: 'queued',
        })
        .returning('id');
      // The version the slice is to be scored against cannot be read: scoring throws in the thread.
      const broken = { ...slice, basis: 'latest', target: { ...slice.target, id: randomUUID() } };
      await testDb().raw('select pgboss.latchwell_ensure_queues(?)', [channel]);
      const jobId = await new PgBoss({ db: bossDb(testDb()), migrate: false }).send(
        `impact-slice.${channel}`,
        { organisationId: org.id, runId: run.id, slice: 0, slices: 1, spec: broken },
        { retryLimit: 1, retryDelay: 1 },
      );
      await fetch(`${server.url}/api/health`).then((r) => r.arrayBuffer()); // starts its queue
      let job: { state: string; retry_count: number } | undefined;
      for (const deadline = Date.now() + 45_000; Date.now() < deadline;) {
        job = await testDb()('pgboss.job').where({ id: jobId }).first('state', 'retry_count');
        if (job?.state === 'failed') break;
        await new Promise((r) => setTimeout(r, 250));
      }
      expect(job).toMatchObject({ state: 'failed', retry_count: 1 });
      const row = await testDb()('impact_runs').where({ id: run.id }).first();
      expect(row).toMatchObject({ status: 'failed', slices_done: 0, considered: 0 });
      expect(row.last_error).toMatch(/content_sha256/);

      const owner = await signIn(org.owner.email, fixturePassword);
      const view = await expectJson<ImpactRunView>(
        await owner.fetch(`/api/archive/impact/run?versionId=${v2026.id}&basis=latest`),
      );
      expect(view.run).toMatchObject({ id: run.id, status: 'failed', slicesDone: 0 });
      expect(view.run!.lastError).toMatch(/content_sha256/);
      const jobs = await expectJson<JobList>(await owner.fetch('/api/jobs'));
      expect(jobs.items.find((j) => j.id === jobId)).toMatchObject({
        queue: 'impact-slice',
        status: 'failed',
        canRetry: true,
      });
      // The instance kept serving.
      expect((await fetch(`${server.url}/api/health`)).status).toBe(200);
    } finally {
      await server.stop();
    }
  }, 90_000);
});
