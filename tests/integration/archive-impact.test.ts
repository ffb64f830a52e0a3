/**
 * Ruleset impact over HTTP: signed assessments under north-american-gate 2015.1 re-scored
 * against 2026.1. Walk-through records are generated until one gets a worse verdict under the
 * new version and one does not (decided by the same engine, so the test follows the shipped
 * rulesets as they change); the stored results must not change.
 */
import fs from 'node:fs';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort, startAppServer } from '../../src/cli/services';
import type { ImpactReport, ImpactRunView } from '../../src/lib/api/impact';
import { loadRulesetFile } from '../../src/lib/rules';
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
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import {
  addClient,
  addGate,
  addSite,
  expectJson,
  fileAssessment,
  publishedVersion,
  type PublishedVersion,
} from './support/archive';

const rank = { clear: 0, remedy: 1, withdraw: 2 } as const;
let org: FixtureOrganisation;
let office: TestClient;
let v2015: PublishedVersion;
let v2026: PublishedVersion;
const filed: Record<string, string> = {};
const gates: Record<string, string> = {};

interface Case {
  gate: SampleGate;
  documents: SampleDocuments;
}

function verdictUnder(version: PublishedVersion, c: Case) {
  const built = buildEngineInput({ ...c.gate, usageClass: 1 } as never, c.documents as never);
  return built.ok ? scoreParsed(built.value, version.loaded).verdict : null;
}

/** The first generated records that get worse, and that stay the same, under the new version. */
function findCases(): { worse: Case; same: Case } {
  const prng = createPrng(9001);
  let worse: Case | undefined;
  let same: Case | undefined;
  for (let i = 0; i < 5000 && !(worse && same); i++) {
    const c = { gate: sampleGate(prng), documents: sampleDocuments(prng, v2015.loaded.version) };
    const before = verdictUnder(v2015, c);
    const after = verdictUnder(v2026, c);
    if (!before || !after) continue;
    if (!worse && rank[after] > rank[before]) worse = c;
    if (!same && after === before && before !== 'withdraw') same = c;
  }
  if (!worse || !same)
    throw new Error(
      'no generated record gets worse under north-american-gate 2026.1; the rulesets may have converged',
    );
  return { worse, same };
}

beforeAll(async () => {
  org = await createOrganisation('impact');
  office = await signIn(org.office.email, fixturePassword);
  [v2015, v2026] = await Promise.all([
    publishedVersion('north-american-gate', '2015.1'),
    publishedVersion('north-american-gate', '2026.1'),
  ]);
  const { worse, same } = findCases();
  const client = await addClient(org.id, 'Fieldfare Close Association');
  const site = await addSite(org.id, client, '1 Fieldfare Close', 'Brookhaven', 1);
  const base = { organisationId: org.id, auditorId: org.auditor.id, usageClass: 1 };
  gates.worse = await addGate(org.id, site, 'North gate', worse.gate);
  gates.same = await addGate(org.id, site, 'South gate', same.gate);
  gates.revisited = await addGate(org.id, site, 'Service gate', worse.gate);
  filed.worse = (
    await fileAssessment({
      ...base,
      gateId: gates.worse,
      gate: worse.gate,
      version: v2015,
      documents: worse.documents,
      visitedOn: '2025-04-01T10:00:00Z',
    })
  ).id;
  filed.same = (
    await fileAssessment({
      ...base,
      gateId: gates.same,
      gate: same.gate,
      version: v2015,
      documents: same.documents,
      visitedOn: '2025-04-01T11:00:00Z',
    })
  ).id;
  // Visited under the old version, then again under the new one: its standing record is already current.
  filed.revisitedOld = (
    await fileAssessment({
      ...base,
      gateId: gates.revisited,
      gate: worse.gate,
      version: v2015,
      documents: worse.documents,
      visitedOn: '2024-04-01T10:00:00Z',
    })
  ).id;
  filed.revisitedNew = (
    await fileAssessment({
      ...base,
      gateId: gates.revisited,
      gate: worse.gate,
      version: v2026,
      documents: worse.documents,
      visitedOn: '2026-04-01T10:00:00Z',
    })
  ).id;
});

/** A second built server on the suite's database, with re-scoring threads and one assessment per slice. */
async function threadedServer(env: Record<string, string>) {
  return startAppServer({
    port: await freePort(),
    quiet: true,
    env: {
      DATABASE_URL: inject('databaseUrl'),
      AUTH_SECRET: 'integration-test-secret-0123456789abcdef',
      AUTH_TRUST_HOST: 'true',
      LATCHWELL_DATA_DIR: inject('dataDir'),
      LATCHWELL_ENV: 'test',
      OUTBOX_WORKER: 'off',
      SMTP_URL: 'smtp://127.0.0.1:9',
      // One assessment per slice, so even this small archive goes to the workers.
      IMPACT_SLICE_SIZE: '1',
      ...env,
    },
  });
}

describe('ruleset impact', () => {
  it('lists the gates whose last signed visit would get a worse verdict, with the rules responsible, without touching stored results', async () => {
    const stored = await testDb()('assessments')
      .where({ organisation_id: org.id })
      .orderBy('id')
      .select('id', 'result_sha256', 'verdict', 'updated_at');
    const report = await expectJson<ImpactReport>(
      await office.fetch(`/api/archive/impact?versionId=${v2026.id}`),
    );
    expect(report).toMatchObject({
      basis: 'latest',
      considered: 2,
      worse: 1,
      same: 1,
      unscorable: 0,
      truncated: false,
    });
    expect(report.target).toMatchObject({ family: 'north-american-gate', version: '2026.1' });
    expect(report.target.comparedWith).toContain('2015.1');
    const [item] = report.items;
    expect(item).toMatchObject({
      assessmentId: filed.worse,
      gateId: gates.worse,
      gateLabel: 'North gate',
      clientName: 'Fieldfare Close Association',
      fromVersion: '2015.1',
      change: 'worse',
    });
    expect(rank[item!.after!]).toBeGreaterThan(rank[item!.before]);
    expect(item!.rules.length).toBeGreaterThan(0);
    // Every rule named really drives the new verdict, and was not already failing that badly.
    for (const rule of item!.rules) {
      expect(['fail', 'needs_info']).toContain(rule.outcome);
      expect(rule.severity === 'critical' || (rule.severity === 'major' && rule.outcome === 'fail')).toBe(
        true,
      );
      expect(rule.before === 'fail' && rule.beforeSeverity === rule.severity).toBe(false);
    }
    expect(
      await testDb()('assessments')
        .where({ organisation_id: org.id })
        .orderBy('id')
        .select('id', 'result_sha256', 'verdict', 'updated_at'),
    ).toEqual(stored);
  });

  it('re-scores every signed visit with basis=all, and exports the list as CSV', async () => {
    const all = await expectJson<ImpactReport>(
      await office.fetch(`/api/archive/impact?versionId=${v2026.id}&basis=all`),
    );
    expect(all).toMatchObject({ considered: 3, worse: 2, same: 1 });
    expect(all.items.map((i) => i.assessmentId).sort()).toEqual([filed.worse, filed.revisitedOld].sort());

    const csv = await office.fetch(`/api/archive/impact.csv?versionId=${v2026.id}`);
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toBe('text/csv; charset=utf-8');
    expect(csv.headers.get('content-disposition')).toBe(
      'attachment; filename="impact-north-american-gate-2026.1.csv"',
    );
    const lines = (await csv.text()).trim().split('\r\n');
    expect(lines[0]).toMatch(/^client,address,city,gate,/);
    expect(lines).toHaveLength(2);
    expect(lines[1]).toContain(filed.worse);
    expect(lines[1]).toContain('Fieldfare Close Association');
  });

  it('gives the same list when the built server spreads the re-scoring over worker threads', async () => {
    const here = await expectJson<ImpactReport>(
      await office.fetch(`/api/archive/impact?versionId=${v2026.id}&basis=all`),
    );
    const server = await threadedServer({ IMPACT_WORKERS: '2' });
    try {
      const res = await fetch(`${server.url}/api/archive/impact?versionId=${v2026.id}&basis=all`, {
        headers: { cookie: office.cookie, accept: 'application/json', origin: server.url },
      });
      const spread = await expectJson<ImpactReport>(res);
      expect(spread.workers).toBe(2);
      expect(here.workers).toBe(0);
      const { durationMs: _a, workers: _b, ...same } = spread;
      const { durationMs: _c, workers: _d, ...expected } = here;
      expect(same).toEqual(expected);
    } finally {
      await server.stop();
    }
  }, 60_000);

  it('shares one bounded pool of re-scoring threads between concurrent reports and CSV exports', async () => {
    const expected = await expectJson<ImpactReport>(
      await office.fetch(`/api/archive/impact?versionId=${v2026.id}&basis=all`),
    );
    const bound = 2;
    const server = await threadedServer({ IMPACT_WORKERS: String(bound), IMPACT_QUEUE_WORKER: 'off' });
    // The server's OS threads (a worker thread is one of them), read from /proc.
    const threads = () =>
      Number(/^Threads:\s+(\d+)/m.exec(fs.readFileSync(`/proc/${server.child.pid}/status`, 'utf8'))![1]);
    const get = (path: string) =>
      fetch(`${server.url}${path}`, { headers: { cookie: office.cookie, accept: 'application/json' } });
    try {
      // Warm up what every request uses (the database pool, the job queue, libuv's threads).
      for (let i = 0; i < 3; i++) await (await get('/api/archive?limit=5')).arrayBuffer();
      await new Promise((resolve) => setTimeout(resolve, 300));
      const before = threads();
      let most = before;
      const sampler = setInterval(() => (most = Math.max(most, threads())), 5);
      const concurrent = 6;
      const query = `versionId=${v2026.id}&basis=all`;
      const answers = await Promise.all([
        ...Array.from({ length: concurrent }, () => get(`/api/archive/impact?${query}`)),
        get(`/api/archive/impact.csv?${query}`),
        get(`/api/archive/impact.csv?${query}`),
      ]);
      clearInterval(sampler);
      most = Math.max(most, threads());
      const reports = await Promise.all(answers.slice(0, concurrent).map((r) => expectJson<ImpactReport>(r)));
      const csvs = await Promise.all(answers.slice(concurrent).map((r) => r.text()));
      // Every answer is whole and the same as one report alone; the threads were really used.
      for (const report of reports) {
        expect(report.workers).toBe(bound);
        const { durationMs: _a, workers: _b, ...same } = report;
        const { durationMs: _c, workers: _d, ...alone } = expected;
        expect(same).toEqual(alone);
      }
      for (const csv of csvs) expect(csv.trim().split('\n')).toHaveLength(1 + expected.worse);
      // A pool per request would have added `bound` threads for each of the eight; one shared
      // pool adds `bound` (one more allowed for anything else the server starts meanwhile).
      expect(most - before, `threads before ${before}, at most ${most}`).toBeLessThanOrEqual(bound + 1);
    } finally {
      await server.stop();
    }
  }, 90_000);

  it('runs on the job queue in slices that two server instances share, with progress, and finds the same', async () => {
    const expected = await expectJson<ImpactReport>(
      await office.fetch(`/api/archive/impact?versionId=${v2026.id}&basis=all`),
    );
    const channel = `impact-${Date.now().toString(36)}`;
    const env = {
      ...inject('serverEnv'),
      // Their own channel: only these two instances take the slices.
      OUTBOX_CHANNEL: channel,
      OUTBOX_WORKER: 'off',
      // One assessment per slice: three slices for this small archive.
      IMPACT_SLICE_SIZE: '1',
    };
    const servers = [
      await startAppServer({ port: await freePort(), quiet: true, env }),
      await startAppServer({ port: await freePort(), quiet: true, env }),
    ];
    try {
      const on = (i: number, path: string, init: RequestInit = {}) =>
        fetch(`${servers[i]!.url}${path}`, {
          ...init,
          headers: {
            cookie: office.cookie,
            accept: 'application/json',
            'content-type': 'application/json',
            // Both serve the suite's public address, as behind a load balancer.
            origin: inject('serverEnv').PUBLIC_URL,
          },
        });
      const started = await expectJson<ImpactRunView>(
        await on(0, '/api/archive/impact/run', {
          method: 'POST',
          body: JSON.stringify({ versionId: v2026.id, basis: 'all' }),
        }),
        202,
      );
      expect(started.run).toMatchObject({ reason: 'requested', slicesTotal: 3 });
      const runId = started.run!.id;
      const slices = await testDb()('pgboss.job')
        .where({ name: `impact-slice.${channel}` })
        .whereRaw(`data ->> 'runId' = ?`, [runId])
        .select('data');
      expect(slices).toHaveLength(3);
      expect(slices.every((j) => j.data.organisationId === org.id)).toBe(true);
      // Progress, read through the other instance, until done.
      const seen = new Set<number>();
      let view: ImpactRunView | undefined;
      for (const deadline = Date.now() + 30_000; Date.now() < deadline;) {
        view = await expectJson<ImpactRunView>(
          await on(1, `/api/archive/impact/run?versionId=${v2026.id}&basis=all`),
        );
        seen.add(view.run!.slicesDone);
        if (view.run!.status === 'done') break;
        await new Promise((r) => setTimeout(r, 100));
      }
      expect(view!.run).toMatchObject({ id: runId, status: 'done', slicesDone: 3 });
      expect(view!.run!.instances).toBeGreaterThanOrEqual(1);
      const { durationMs: _a, workers: _b, ...found } = view!.report!;
      const { durationMs: _c, workers: _d, ...same } = expected;
      expect(found).toEqual(same);
      // The impact page reads the run.
      expect((await on(1, '/archive/impact')).status).toBe(200);
    } finally {
      await Promise.all(servers.map((s) => s.stop()));
    }
  }, 90_000);

  it('queues a run by itself when the organisation publishes a new version of its own family', async () => {
    const owner = await signIn(org.owner.email, fixturePassword);
    const first = await (
      await owner.json('POST', '/api/rulesets/amendments', {
        fromFamily: 'north-american-gate',
        fromVersion: '2015.1',
      })
    ).json();
    expect((await owner.json('POST', `/api/rulesets/${first.family}/${first.version}/publish`)).status).toBe(
      200,
    );
    const stored = await testDb()('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where({ 'r.organisation_id': org.id, 'r.family': first.family, 'rv.version': first.version })
      .first('rv.id', 'rv.content');
    // Nothing signed under an earlier version of the local family yet: publishing it queues nothing.
    expect(await testDb()('impact_runs').where({ version_id: stored.id })).toHaveLength(0);
    const local: PublishedVersion = {
      id: stored.id,
      family: first.family,
      version: first.version,
      loaded: loadRulesetFile(stored.content),
    };
    const prng = createPrng(77);
    const client = await addClient(org.id, 'Larkspur Mews', null);
    const site = await addSite(org.id, client, '9 Larkspur Mews', 'Fenbridge', 2);
    const gate = sampleGate(prng);
    await fileAssessment({
      organisationId: org.id,
      gateId: await addGate(org.id, site, 'Mews gate', gate),
      auditorId: org.auditor.id,
      version: local,
      gate,
      usageClass: 2,
      visitedOn: '2025-06-01T10:00:00Z',
      prng,
    });

    const second = await (
      await owner.json('POST', '/api/rulesets/amendments', {
        fromFamily: first.family,
        fromVersion: first.version,
      })
    ).json();
    expect(
      (await owner.json('POST', `/api/rulesets/${second.family}/${second.version}/publish`)).status,
    ).toBe(200);
    const secondId = (
      await testDb()('ruleset_versions as rv')
        .join('rulesets as r', 'r.id', 'rv.ruleset_id')
        .where({ 'r.organisation_id': org.id, 'r.family': second.family, 'rv.version': second.version })
        .first('rv.id')
    ).id;
    const [run] = await testDb()('impact_runs').where({ organisation_id: org.id, version_id: secondId });
    expect(run).toMatchObject({ reason: 'published', basis: 'latest', slices_total: 1 });
    // The suite's server takes the slice.
    for (const deadline = Date.now() + 30_000; Date.now() < deadline;) {
      const view = await expectJson<ImpactRunView>(
        await office.fetch(`/api/archive/impact/run?versionId=${secondId}`),
      );
      if (view.run?.status === 'done') {
        expect(view.run.id).toBe(run.id);
        expect(view.report!.considered).toBe(1);
        return;
      }
      await new Promise((r) => setTimeout(r, 200));
    }
    throw new Error('the run queued on publishing did not finish');
  }, 60_000);

  it('answers the run already queued for a version and basis instead of queuing another', async () => {
    const [waiting] = await testDb()('impact_runs')
      .insert({ organisation_id: org.id, version_id: v2026.id, basis: 'latest', reason: 'requested' })
      .returning('id');
    const count = async () =>
      Number(
        (
          await testDb()('impact_runs')
            .where({ organisation_id: org.id, version_id: v2026.id, basis: 'latest' })
            .count<{ n: string }[]>({ n: '*' })
        )[0]!.n,
      );
    try {
      const before = await count();
      const res = await office.json('POST', '/api/archive/impact/run', {
        versionId: v2026.id,
        basis: 'latest',
      });
      expect(res.status).toBe(202);
      expect(((await res.json()) as ImpactRunView).run?.id).toBe(waiting.id);
      expect(await count()).toBe(before);
    } finally {
      await testDb()('impact_runs').where({ id: waiting.id }).update({ status: 'failed' });
    }
  });

  it('refuses a version that is not published or not visible, and a bad query', async () => {
    expect(
      (await office.fetch('/api/archive/impact?versionId=00000000-0000-4000-8000-000000000000')).status,
    ).toBe(404);
    expect((await office.fetch(`/api/archive/impact?versionId=${v2026.id}&basis=some`)).status).toBe(400);
    const page = await office.fetch('/archive/impact');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Ruleset impact');
  });
});
