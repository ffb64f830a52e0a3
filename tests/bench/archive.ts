/**
 * Archive benchmark (`npx tsx tests/bench/archive.ts`, or through `npm run bench -- archive`).
 *
 * Seeds a scratch database (`latchwell_bench_archive`, never the app's or a test run's) with one
 * organisation holding 100,000 assessments across 20,000 gates (5,000 clients, 12,000 sites),
 * then prints:
 *  - p50 / p95 of the archive list API (GET /api/archive over HTTP against the built server,
 *    signed in as the office) for typical filters: none, free text, kind + status, verdict,
 *    date range, auditor, usage class + verdict, sort by client, a deep keyset page;
 *  - the time to compute a ruleset impact over all of them: every assessment is signed under
 *    north-american-gate 2015.1 and re-scored in memory against 2026.1.
 * Targets: list p95 < 50 ms; impact < 30 s.
 * `runImpactRunsBench` (`npx tsx tests/bench/archive.ts impact-runs`, or `npm run bench --
 * impact-runs`) times the same impact as a queued run, one server instance against two.
 *
 * Seeding happens inside PostgreSQL: 2,000 walk-through records are generated and scored with
 * the real engine, and generate_series spreads them over the gates' visits, so every row carries
 * a realistic stored result (about 40 kB of JSON). The seeded database is kept and reused by the
 * next run (set ARCHIVE_BENCH_RESEED=1 to start over; ARCHIVE_BENCH_DROP=1 drops it afterwards).
 */
import { availableParallelism, loadavg } from 'node:os';
import { pathToFileURL } from 'node:url';
import knex, { type Knex } from 'knex';
import pg from 'pg';
import { knexConfig } from '../../knexfile';
import { adoptDatabase, appUrlFor, ensureDatabase } from '../../db/launcher';
import { migrateLatest } from '../../src/cli/migrate';
import { publishRulesetFiles } from '../../src/cli/publish-rulesets';
import { ensureBuilt, freePort, startAppServer } from '../../src/cli/services';
import { loadRulesetFile, resultSha256, scoreParsed } from '../../src/lib/rules';
import { buildEngineInput } from '../../src/lib/server/assessment-input';
import { hashPassword } from '../../src/lib/server/passwords';
import { createPrng, sampleDocuments, sampleGate } from '../support/archive-samples';

export interface ArchiveBenchFigures {
  listP50Ms: number;
  listP95Ms: number;
  /** Per filter: p50 / p95 in ms. */
  perFilter: Record<string, { p50: number; p95: number }>;
  countP95Ms: number;
  impactSeconds: number;
  impactAssessments: number;
  impactWorse: number;
  impactPerAssessmentUs: number;
  assessments: number;
  gates: number;
}

const DATABASE = 'latchwell_bench_archive';
const SEED_MARK = 'archive-bench-v1';
const GATES = 20_000;
const VISITS_PER_GATE = 5;
const SITES = 12_000;
const CLIENTS = 5_000;
const PROFILES = 400;
const VARIANTS = 5;
const PASSWORD = 'bench-gate-pass-2026';
const REPEATS = 25;

const round2 = (n: number) => Math.round(n * 100) / 100;
const percentile = (sorted: number[], p: number) =>
  sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] ?? NaN;

async function scratchDatabase(adminUrl: string, appUrl: string, reseed: boolean): Promise<string> {
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  try {
    if (reseed) await admin.query(`drop database if exists "${DATABASE}" with (force)`);
    const { rowCount } = await admin.query('select 1 from pg_database where datname = $1', [DATABASE]);
    if (!rowCount)
      await admin.query(
        `create database "${DATABASE}" owner "${decodeURIComponent(new URL(appUrl).username)}"`,
      );
  } finally {
    await admin.end();
  }
  await adoptDatabase(DATABASE); // kept from a run before the owner role existed
  const url = new URL(appUrl);
  url.pathname = `/${DATABASE}`;
  return url.toString();
}

/** Words for invented names: shuffled together they give thousands of distinct clients and streets. */
const CLIENT_WORDS = [
  'Harrow',
  'Fennick',
  'Larkspur',
  'Quarry',
  'Moss',
  'Tollbar',
  'Fieldfare',
  'Saltmere',
  'Brook',
  'Pennine',
  'Wren',
  'Copper',
  'Ash',
  'Heron',
  'Linden',
  'Marsh',
];
const CLIENT_KINDS = [
  'Lettings',
  'Household',
  'Storage',
  'Residents',
  'Estates',
  'Logistics',
  'Farm',
  'Court Association',
];
const STREETS = [
  'Fennick Row',
  'Tollbar Yard',
  'Harrowgate Close',
  'Quayside Walk',
  'Larkspur Row',
  'Pennine Court',
  'Brookhaven Lane',
  'Heron Way',
  'Copperfield Road',
  'Wrenfold Drive',
  'Ashby Mews',
  'Linden Crescent',
];
const CITIES = [
  'Eastholm',
  'Westmarch',
  'Saltmere',
  'Northwick',
  'Brookhaven',
  'Hollins',
  'Greyford',
  'Marlow Cross',
];
const GATE_LABELS = [
  'Front drive gate',
  'Rear yard slider',
  'Service gate',
  'Courtyard gate',
  'Depot main gate',
  'North entrance',
  'Loading bay gate',
  'Paddock gate',
];

const sqlArray = (values: string[]) => `array[${values.map((v) => `'${v.replace(/'/g, "''")}'`).join(',')}]`;

async function seed(
  db: Knex,
): Promise<{ organisationId: string; officeEmail: string; auditorIds: string[] }> {
  const started = performance.now();
  const [v2015] = await db('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .where({ 'r.family': 'north-american-gate', 'rv.version': '2015.1' })
    .select('rv.id', 'rv.content');
  if (!v2015) throw new Error('north-american-gate 2015.1 is not published in the bench database');
  const loaded = loadRulesetFile(v2015.content);

  // 2,000 walk-through records: 400 gate profiles (each with a usage class) × 5 visits' answers, scored for real.
  const prng = createPrng(20_261_202);
  const pool: Record<string, unknown>[] = [];
  for (let p = 0; p < PROFILES; p++) {
    const gate = sampleGate(prng);
    const usageClass = 1 + (p % 4);
    for (let v = 0; v < VARIANTS; v++) {
      const documents = sampleDocuments(prng, loaded.version, 0.97);
      const built = buildEngineInput({ ...gate, usageClass } as never, documents as never);
      if (!built.ok)
        throw new Error(`generated record does not build: ${JSON.stringify(built.errors).slice(0, 300)}`);
      const result = scoreParsed(built.value, loaded);
      pool.push({
        profile: p,
        variant: v,
        kind: gate.kind,
        gate: JSON.stringify(gate),
        snapshot: JSON.stringify({ ...gate, site: { usageClass } }),
        answers: JSON.stringify(documents.answers),
        measurements: JSON.stringify(documents.measurements),
        observations: JSON.stringify(documents.observations),
        result: JSON.stringify(result),
        result_sha256: resultSha256(result),
        verdict: result.verdict,
      });
    }
  }
  console.log(
    `  scored ${pool.length} walk-through records in ${((performance.now() - started) / 1000).toFixed(1)} s`,
  );

  const hash = await hashPassword(PASSWORD);
  return db.transaction(async (trx) => {
    const [org] = await trx('organisations')
      .insert({ name: 'Benchmark Gate Works', slug: SEED_MARK, time_zone: 'UTC' })
      .returning('id');
    const staff = [
      { email: 'owner@bench-archive.test', name: 'Bench Owner', role: 'owner' },
      { email: 'office@bench-archive.test', name: 'Bench Office', role: 'office' },
      ...Array.from({ length: 8 }, (_, i) => ({
        email: `auditor${i + 1}@bench-archive.test`,
        name: `Bench Auditor ${i + 1}`,
        role: 'auditor',
      })),
    ];
    const users = await trx('users')
      .insert(staff.map((s) => ({ ...s, organisation_id: org.id, password_hash: hash })))
      .returning(['id', 'role']);
    const auditorIds = users.filter((u) => u.role === 'auditor').map((u) => u.id as string);
    await trx.raw(
      'create temporary table bench_pool (profile int, variant int, kind text, gate jsonb, snapshot jsonb, answers jsonb, measurements jsonb, observations jsonb, result jsonb, result_sha256 text, verdict text) on commit drop',
    );
    for (let i = 0; i < pool.length; i += 200) await trx('bench_pool').insert(pool.slice(i, i + 200));
    await trx.raw('create temporary table bench_auditors (n int, id uuid) on commit drop');
    await trx('bench_auditors').insert(auditorIds.map((id, n) => ({ n, id })));

    const o = org.id as string;
    await trx.raw(
      `insert into clients (organisation_id, name, kind, contact_email)
       select ?, (${sqlArray(CLIENT_WORDS)})[1 + i % ${CLIENT_WORDS.length}] || ' ' || (${sqlArray(CLIENT_WORDS)})[1 + (i / ${CLIENT_WORDS.length}) % ${CLIENT_WORDS.length}] || ' ' || (${sqlArray(CLIENT_KINDS)})[1 + i % ${CLIENT_KINDS.length}] || ' ' || i,
              'property_manager', 'desk' || i || '@clients.bench.test'
       from generate_series(0, ${CLIENTS - 1}) i`,
      [o],
    );
    // Sites and gates get their ids up front (temporary tables), so each gate keeps its profile.
    await trx.raw(
      `create temporary table bench_sites on commit drop as
       select gen_random_uuid() as id, s.i as n, c.id as client_id, 1 + s.i % 4 as usage_class
       from generate_series(0, ${SITES - 1}) s(i)
       join (select id, row_number() over (order by id) - 1 as n from clients where organisation_id = ?) c on c.n = s.i % ${CLIENTS}`,
      [o],
    );
    await trx.raw(
      `insert into sites (id, organisation_id, client_id, address_line1, city, postal_code, usage_class)
       select s.id, ?, s.client_id, (1 + (s.n * 7) % 240) || ' ' || (${sqlArray(STREETS)})[1 + s.n % ${STREETS.length}],
              (${sqlArray(CITIES)})[1 + (s.n / 3) % ${CITIES.length}], 'LW' || (1 + s.n % 40) || ' ' || (s.n % 9) || chr(65 + s.n % 26) || chr(65 + (s.n / 26) % 26),
              s.usage_class
       from bench_sites s`,
      [o],
    );
    // Gate i stands at site i % SITES; its profile has that site's usage class.
    await trx.raw(
      `create temporary table bench_gates on commit drop as
       select gen_random_uuid() as id, g.i as n, s.id as site_id, ((g.i / ${SITES} + g.i) % 100) * 4 + s.usage_class - 1 as profile
       from generate_series(0, ${GATES - 1}) g(i)
       join bench_sites s on s.n = g.i % ${SITES}`,
    );
    await trx.raw(
      `insert into gates (id, organisation_id, site_id, label, kind, leaves, opening_direction, width_mm, height_mm, weight_kg, entered, operator)
       select g.id, ?, g.site_id, (${sqlArray(GATE_LABELS)})[1 + g.n % ${GATE_LABELS.length}] || ' ' || (1 + g.n / ${SITES}),
              p.kind, p.gate ->> 'leaves', p.gate ->> 'openingDirection', (p.gate ->> 'widthMm')::int, (p.gate ->> 'heightMm')::int, (p.gate ->> 'weightKg')::int,
              p.gate -> 'entered', p.gate -> 'operator'
       from bench_gates g join bench_pool p on p.profile = g.profile and p.variant = 0`,
      [o],
    );
    // Five visits a gate, a year or so apart, 2021–2026; the latest visit of every tenth gate is
    // awaiting signature, of every twenty-fifth a draft; the rest are signed.
    await trx.raw(
      `insert into assessments (organisation_id, gate_id, ruleset_version_id, auditor_id, status, purpose, answers, measurements, observations,
                                gate_snapshot, result, result_sha256, verdict, visited_on, submitted_at, signed_at)
       select ?, g.id, ?, a.id,
              case when d.draft then 'draft' when v.n = 4 and g.n % 10 = 0 then 'awaiting_signature' else 'signed' end,
              case when v.n = 0 then 'handover' else 'inspection' end,
              p.answers, p.measurements, p.observations,
              case when d.draft then null else p.snapshot end,
              case when d.draft then null else p.result end,
              case when d.draft then null else p.result_sha256 end,
              case when d.draft then null else p.verdict end,
              t.visited,
              case when d.draft then null else t.visited + interval '2 hours' end,
              case when d.draft or (v.n = 4 and g.n % 10 = 0) then null else t.visited + interval '1 day' end
       from bench_gates g
       cross join generate_series(0, ${VISITS_PER_GATE - 1}) v(n)
       cross join lateral (select v.n = 4 and g.n % 25 = 0 as draft) d
       join bench_pool p on p.profile = g.profile and p.variant = v.n
       join bench_auditors a on a.n = (g.n + v.n) % 8
       cross join lateral (select timestamptz '2021-01-04 08:00:00+00' + (v.n * interval '380 days') + ((g.n * 37) % 360) * interval '1 day' + ((g.n * 13) % 9) * interval '1 hour' as visited) t`,
      [o, v2015.id],
    );
    await trx.raw(
      `insert into documents (organisation_id, assessment_id, kind, sha256, storage_key, size_bytes, filename, created_at)
       select a.organisation_id, a.id, 'signed_report', h.sha, h.sha, 180000 + (abs(hashtext(a.id::text)) % 90000), 'report.pdf', a.signed_at
       from assessments a cross join lateral (select md5(a.id::text) || md5(a.id::text || 'signed') as sha) h
       where a.organisation_id = ? and a.status = 'signed'`,
      [o],
    );
    await trx.raw(`update organisations set slug = ? where id = ?`, [`${SEED_MARK}-done`, o]);
    return { organisationId: o, officeEmail: 'office@bench-archive.test', auditorIds };
  });
}

/** Signs in like a browser (CSRF token, credentials callback) and returns the cookie header. */
async function signInCookie(baseUrl: string, email: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair!.indexOf('=');
      jar.set(pair!.slice(0, eq).trim(), pair!.slice(eq + 1).trim());
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const csrf = await fetch(`${baseUrl}/api/auth/csrf`, {
    headers: { accept: 'application/json', origin: baseUrl },
  });
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${baseUrl}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', origin: baseUrl, cookie: cookie() },
    body: new URLSearchParams({ email, password: PASSWORD, csrfToken, callbackUrl: '/' }),
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes('session-token')))
    throw new Error(`bench sign-in failed: ${res.status} ${res.headers.get('location')}`);
  return cookie();
}

async function timeGet(
  baseUrl: string,
  cookie: string,
  path: string,
): Promise<{ ms: number; body: unknown }> {
  const started = performance.now();
  const res = await fetch(`${baseUrl}${path}`, {
    headers: { cookie, accept: 'application/json', origin: baseUrl },
  });
  const body = await res.json();
  const ms = performance.now() - started;
  if (!res.ok) throw new Error(`${path} answered ${res.status}: ${JSON.stringify(body).slice(0, 300)}`);
  return { ms, body };
}

/** The seeded scratch database (seeded on first use), migrated and with the rulesets published. */
async function preparedArchive() {
  process.env.LATCHWELL_QUIET ??= '1';
  const endpoints = await ensureDatabase();
  // Migrated and seeded as the owner role; the server runs as the app role, as in production.
  const databaseUrl = await scratchDatabase(
    endpoints.adminUrl,
    endpoints.migrationUrl,
    process.env.ARCHIVE_BENCH_RESEED === '1',
  );
  await migrateLatest(databaseUrl, endpoints.appRole);
  await publishRulesetFiles(databaseUrl);
  const db = knex({ ...knexConfig(databaseUrl), pool: { min: 0, max: 4 } });
  try {
    let org = await db('organisations').where('slug', `${SEED_MARK}-done`).first('id');
    if (!org) {
      if (await db('organisations').where('slug', SEED_MARK).first('id'))
        throw new Error(`${DATABASE} holds a half-finished seed: run with ARCHIVE_BENCH_RESEED=1`);
      console.log(
        `Seeding ${DATABASE}: ${GATES.toLocaleString('en-GB')} gates, ${(GATES * VISITS_PER_GATE).toLocaleString('en-GB')} assessments…`,
      );
      const started = performance.now();
      await seed(db);
      await db.raw('analyze');
      console.log(`  seeded in ${((performance.now() - started) / 1000).toFixed(1)} s`);
      org = await db('organisations').where('slug', `${SEED_MARK}-done`).first('id');
    }
    return { endpoints, databaseUrl, db, organisationId: org.id as string };
  } catch (error) {
    await db.destroy();
    throw error;
  }
}

async function dropArchiveIfAsked(adminUrl: string): Promise<void> {
  if (process.env.ARCHIVE_BENCH_DROP !== '1') return;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`drop database if exists "${DATABASE}" with (force)`);
  await admin.end();
}

export async function runArchiveBench(): Promise<ArchiveBenchFigures> {
  const { endpoints, databaseUrl, db, organisationId } = await preparedArchive();
  let server: Awaited<ReturnType<typeof startAppServer>> | undefined;
  try {
    const [{ n: assessments }] = await db('assessments')
      .where('organisation_id', organisationId)
      .count({ n: '*' });
    const [{ n: gates }] = await db('gates').where('organisation_id', organisationId).count({ n: '*' });
    const auditor = await db('users')
      .where({ organisation_id: organisationId, role: 'auditor' })
      .orderBy('email')
      .first('id');

    // The list API, over HTTP, as the office.
    await ensureBuilt(console.log, true);
    const port = await freePort();
    server = await startAppServer({
      port,
      quiet: true,
      env: {
        DATABASE_URL: appUrlFor(endpoints, databaseUrl),
        AUTH_SECRET: 'archive-bench-secret-0123456789abcdef',
        AUTH_TRUST_HOST: 'true',
        LATCHWELL_ENV: 'test',
        OUTBOX_WORKER: 'off',
        SMTP_URL: 'smtp://127.0.0.1:9',
      },
    });
    const cookie = await signInCookie(server.url, 'office@bench-archive.test');
    const deep = await (async () => {
      let path = '/api/archive?limit=25';
      for (let i = 0; i < 40; i++)
        path = `/api/archive?limit=25&after=${((await timeGet(server!.url, cookie, path)).body as { nextCursor: string }).nextCursor}`;
      return path;
    })();
    const filters: Record<string, string> = {
      'no filter': '/api/archive?limit=25',
      'free text (client)': '/api/archive?q=larkspur%20wren',
      'free text (street)': '/api/archive?q=tollbar',
      'free text (rare)': '/api/archive?q=copper%20ash%20estates%2042',
      'kind + status': '/api/archive?gateKind=slide&status=signed',
      verdict: '/api/archive?verdict=withdraw',
      'date range': '/api/archive?from=2023-03-01&to=2023-03-31',
      auditor: `/api/archive?auditorId=${auditor.id}`,
      'usage class + verdict': '/api/archive?usageClass=3&verdict=remedy',
      'sort by client': '/api/archive?sort=client',
      'page 41 (keyset)': deep,
    };
    for (const path of Object.values(filters)) await timeGet(server.url, cookie, path); // warm up
    const all: number[] = [];
    const perFilter: ArchiveBenchFigures['perFilter'] = {};
    const samples: Record<string, number[]> = Object.fromEntries(Object.keys(filters).map((k) => [k, []]));
    for (let r = 0; r < REPEATS; r++) {
      for (const [name, path] of Object.entries(filters)) {
        const { ms } = await timeGet(server.url, cookie, path);
        samples[name]!.push(ms);
        all.push(ms);
      }
    }
    for (const [name, list] of Object.entries(samples)) {
      list.sort((a, b) => a - b);
      perFilter[name] = { p50: round2(percentile(list, 0.5)), p95: round2(percentile(list, 0.95)) };
    }
    all.sort((a, b) => a - b);
    const counts: number[] = [];
    for (let r = 0; r < 10; r++)
      counts.push((await timeGet(server.url, cookie, '/api/archive/count?gateKind=slide&status=signed')).ms);
    counts.sort((a, b) => a - b);
    await server.stop();
    server = undefined;

    // Impact: every assessment (all under 2015.1) re-scored against 2026.1, in this process.
    const previousUrl = process.env.DATABASE_URL;
    process.env.DATABASE_URL = databaseUrl;
    const { impactReport, impactTarget } = await import('../../src/lib/server/impact');
    const { closeDatabase } = await import('../../src/lib/server/db');
    const [v2026] = await db('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where({ 'r.family': 'north-american-gate', 'rv.version': '2026.1' })
      .select('rv.id');
    const target = await impactTarget(organisationId, v2026.id);
    if (!target) throw new Error('north-american-gate 2026.1 is not published in the bench database');
    const impactStarted = performance.now();
    const report = await impactReport(organisationId, target, 'all');
    const impactSeconds = (performance.now() - impactStarted) / 1000;
    await closeDatabase();
    if (previousUrl === undefined) delete process.env.DATABASE_URL;
    else process.env.DATABASE_URL = previousUrl;

    const figures: ArchiveBenchFigures = {
      listP50Ms: round2(percentile(all, 0.5)),
      listP95Ms: round2(percentile(all, 0.95)),
      perFilter,
      countP95Ms: round2(percentile(counts, 0.95)),
      impactSeconds: round2(impactSeconds),
      impactAssessments: report.considered,
      impactWorse: report.worse,
      impactPerAssessmentUs: round2((impactSeconds * 1e6) / Math.max(1, report.considered)),
      assessments: Number(assessments),
      gates: Number(gates),
    };
    console.log(
      `Machine: load average ${loadavg()
        .map((l) => l.toFixed(1))
        .join(' ')}`,
    );
    console.log(
      `Archive of ${figures.assessments.toLocaleString('en-GB')} assessments across ${figures.gates.toLocaleString('en-GB')} gates (${DATABASE})`,
    );
    console.log(
      `  list API over HTTP, ${REPEATS} rounds of ${Object.keys(filters).length} typical filters: p50 ${figures.listP50Ms} ms, p95 ${figures.listP95Ms} ms (target p95 < 50 ms)`,
    );
    for (const [name, f] of Object.entries(perFilter))
      console.log(
        `    ${name.padEnd(24)} p50 ${String(f.p50).padStart(7)} ms   p95 ${String(f.p95).padStart(7)} ms`,
      );
    console.log(`  count (kind + status): p95 ${figures.countP95Ms} ms`);
    console.log(
      `  impact of 2026.1 over ${report.considered.toLocaleString('en-GB')} signed assessments: ${figures.impactSeconds} s (${figures.impactPerAssessmentUs} µs each, ${report.workers ? `${report.workers} worker threads` : 'one thread'}; ${report.worse} worse, ${report.same} same, ${report.better} better, ${report.unscorable} unscorable) (target < 30 s)`,
    );
    return figures;
  } finally {
    await server?.stop();
    await db.destroy();
    await dropArchiveIfAsked(endpoints.adminUrl);
  }
}

/** Figures of the queued-run bench, flat: `t<threads>…` per series (see runImpactRunsBench). */
export type ImpactRunsBenchFigures = Record<string, number>;

const p95 = (values: number[]) =>
  round2(
    percentile(
      [...values].sort((x, y) => x - y),
      0.95,
    ),
  );

/** Times GET /api/health on `url` back to back (a pause between) until `stop()` says so. */
function healthProbe(url: string, pauseMs = 100) {
  const samples: number[] = [];
  let stopping = false;
  const done = (async () => {
    while (!stopping) {
      const started = performance.now();
      const res = await fetch(`${url}/api/health`, { headers: { accept: 'application/json' } });
      await res.arrayBuffer();
      samples.push(performance.now() - started);
      await new Promise((r) => setTimeout(r, pauseMs));
    }
  })();
  return {
    samples,
    async stop() {
      stopping = true;
      await done;
      return samples;
    },
  };
}

interface QueuedRun {
  seconds: number;
  considered: number;
  worse: number;
  instancesUsed: number;
  slices: number;
  healthIdleP95Ms: number;
  healthDuringP95Ms: number;
  healthDuringMaxMs: number;
}

/** One queued impact run of `versionId` taken by `instances` app servers on a channel of their own. */
async function queuedRun(
  db: Knex,
  serverEnv: Record<string, string>,
  instances: number,
  versionId: string,
  basis: 'latest' | 'all',
): Promise<QueuedRun> {
  const env = { ...serverEnv, OUTBOX_CHANNEL: `bench-${instances}-${Date.now().toString(36)}` };
  const running = [];
  try {
    for (let i = 0; i < instances; i++)
      running.push(await startAppServer({ port: await freePort(), quiet: true, env }));
    // Every instance starts its job queue with its first request (its re-scoring threads with its first slice).
    for (const server of running) await fetch(`${server.url}/api/health`).then((r) => r.arrayBuffer());
    await new Promise((r) => setTimeout(r, 5000));
    const url = running[0]!.url;
    const idle = healthProbe(url, 50);
    await new Promise((r) => setTimeout(r, 2000));
    const healthIdle = await idle.stop();
    const cookie = await signInCookie(url, 'office@bench-archive.test');
    const started = performance.now();
    const res = await fetch(`${url}/api/archive/impact/run`, {
      method: 'POST',
      headers: { cookie, origin: url, 'content-type': 'application/json' },
      body: JSON.stringify({ versionId, basis }),
    });
    if (res.status !== 202) throw new Error(`queueing the impact run answered ${res.status}`);
    const runId = ((await res.json()) as { run: { id: string } }).run.id;
    const during = healthProbe(url);
    let run: { status: string; considered: number; worse: number; instances: string[]; slices_total: number };
    try {
      for (;;) {
        run = await db('impact_runs')
          .where({ id: runId })
          .first('status', 'considered', 'worse', 'instances', 'slices_total');
        if (run.status === 'done') break;
        if (run.status === 'failed') throw new Error('the queued impact run failed');
        await new Promise((r) => setTimeout(r, 250));
      }
    } finally {
      await during.stop();
    }
    const seconds = (performance.now() - started) / 1000;
    return {
      seconds: round2(seconds),
      considered: run.considered,
      worse: run.worse,
      instancesUsed: run.instances.length,
      slices: run.slices_total,
      healthIdleP95Ms: p95(healthIdle),
      healthDuringP95Ms: p95(during.samples),
      healthDuringMaxMs: round2(Math.max(...during.samples)),
    };
  } finally {
    await Promise.all(running.map((r) => r.stop()));
  }
}

/**
 * Queued impact runs (`npm run bench -- impact-runs`): the same run of 2026.1 over the seeded
 * archive, its slices taken by one server instance, then by two against the same database, for
 * each thread setting in IMPACT_BENCH_SERIES (re-scoring threads per instance, comma-separated;
 * default `0,1,2`: 0 is scoring in the server's main thread). Also GET /api/health on the first
 * instance, timed idle and while the run goes: what a load balancer sees of its event loop.
 * IMPACT_BENCH_BASIS `latest` (default: each gate's last signed visit, 20,000 of the 100,000) or
 * `all` (every signed assessment, about 92,000).
 */
export async function runImpactRunsBench(): Promise<ImpactRunsBenchFigures> {
  const { endpoints, databaseUrl, db } = await preparedArchive();
  const basis = process.env.IMPACT_BENCH_BASIS === 'all' ? 'all' : 'latest';
  const series = (process.env.IMPACT_BENCH_SERIES ?? '0,1,2')
    .split(',')
    .map((t) => Number(t.trim()))
    .filter((t) => Number.isInteger(t) && t >= 0);
  try {
    await ensureBuilt(console.log, true);
    const [v2026] = await db('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where({ 'r.family': 'north-american-gate', 'rv.version': '2026.1' })
      .select('rv.id');
    const figures: ImpactRunsBenchFigures = {};
    let considered: number | undefined;
    const sliceSize = process.env.IMPACT_SLICE_SIZE || '1000';
    console.log(
      `Queued impact runs of north-american-gate 2026.1 (basis ${basis}), slices of ${sliceSize}, on ${availableParallelism()} cores`,
    );
    for (const threads of series) {
      const serverEnv = {
        DATABASE_URL: appUrlFor(endpoints, databaseUrl),
        AUTH_SECRET: 'archive-bench-secret-0123456789abcdef',
        AUTH_TRUST_HOST: 'true',
        LATCHWELL_ENV: 'test',
        OUTBOX_WORKER: 'off',
        REINSPECTION_SCHEDULE: 'off',
        SMTP_URL: 'smtp://127.0.0.1:9',
        IMPACT_WORKERS: String(threads),
        IMPACT_SLICE_SIZE: sliceSize,
        ...(process.env.IMPACT_CONCURRENCY ? { IMPACT_CONCURRENCY: process.env.IMPACT_CONCURRENCY } : {}),
      };
      const runs: QueuedRun[] = [];
      for (const instances of [1, 2]) {
        const load = loadavg()[0]!;
        const run = await queuedRun(db, serverEnv, instances, v2026.id, basis);
        considered ??= run.considered;
        if (run.considered !== considered)
          throw new Error(`a queued run considered ${run.considered}, another ${considered}`);
        runs.push(run);
        console.log(
          `  ${threads ? `${threads} re-scoring thread${threads > 1 ? 's' : ''}` : 'main thread'} per instance, ${instances} instance${instances > 1 ? 's' : ''}: ${run.seconds} s for ${run.considered.toLocaleString('en-GB')} assessments in ${run.slices} slices (${run.worse} worse; ${run.instancesUsed} instance(s) took slices); health on instance 1 p95 idle ${run.healthIdleP95Ms} ms, during ${run.healthDuringP95Ms} ms (max ${run.healthDuringMaxMs} ms); load average at start ${load.toFixed(1)}`,
        );
      }
      const [one, two] = runs as [QueuedRun, QueuedRun];
      const key = `t${threads}`;
      figures[`${key}OneSeconds`] = one.seconds;
      figures[`${key}TwoSeconds`] = two.seconds;
      figures[`${key}Speedup`] = round2(one.seconds / Math.max(0.01, two.seconds));
      figures[`${key}HealthIdleP95Ms`] = one.healthIdleP95Ms;
      figures[`${key}HealthDuringP95Ms`] = one.healthDuringP95Ms;
      figures[`${key}PerHundredThousandSeconds`] = round2(
        (one.seconds * 100_000) / Math.max(1, one.considered),
      );
      console.log(
        `    speed-up with two instances ${figures[`${key}Speedup`]}×; 100,000 assessments by extrapolation: one instance ${figures[`${key}PerHundredThousandSeconds`]} s, two ${round2((two.seconds * 100_000) / Math.max(1, two.considered))} s`,
      );
    }
    figures.assessments = considered ?? 0;
    console.log(
      `Machine: load average ${loadavg()
        .map((l) => l.toFixed(1))
        .join(' ')}`,
    );
    return figures;
  } finally {
    await db.destroy();
    await dropArchiveIfAsked(endpoints.adminUrl);
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  (process.argv.includes('impact-runs') ? runImpactRunsBench() : runArchiveBench())
    .then(() => process.exit(0))
    .catch((error) => {
      console.error(error);
      process.exit(1);
    });
}
