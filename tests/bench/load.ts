/**
 * Load on loopback with autocannon: 20 connections (LOAD_CONNECTIONS) for 30 s each against
 * the archive list, a signed-in assessment list, an assessment read, the score endpoint and an
 * autosave, each in LOAD_ROUNDS (3) slices that alternate with equal slices of /api/health of the
 * same server (the ceiling). Prints requests/s, p50/p95/p99 latency and errors, and each
 * endpoint's throughput as a share of health's in its own slices, so a machine that slows down
 * or speeds up during the run tilts both sides alike. Bounded in time; traffic goes to
 * 127.0.0.1 only.
 *
 * `npx tsx tests/bench/load.ts [seconds]` (default 30, or LOAD_SECONDS); LOAD_TARGETS=read,list
 * runs only those endpoints (and health); BENCH_CPU_PROF_DIR=dir profiles the server. Non-2xx answers are
 * counted by status; for the autosave the first body of each status is printed too.
 */
import autocannon, { type Result } from 'autocannon';
import fs from 'node:fs';
import path from 'node:path';
import { demoPassword } from '../../db/seeds/demo/people';
import { projectRoot } from '../../src/cli/services';
import { isMain } from '../../src/cli/is-main';
import { signInCookie, startBenchApp } from './support/app';

const connections = Number(process.env.LOAD_CONNECTIONS ?? 20);

interface Figures {
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  /** How many answers had each status other than 2xx, e.g. { 409: 12 }. */
  non2xxByStatus: Record<string, number>;
  /** Connection errors and timeouts (no status at all). */
  connectionErrors: number;
  timeouts: number;
}

/** autocannon's histogram has p97.5 and p99; p95 is interpolated between p90 and p97.5. */
function figures(result: Result): Figures {
  const l = result.latency as unknown as Record<string, number>;
  const p95 = l.p90 + ((l.p97_5 - l.p90) * (95 - 90)) / (97.5 - 90);
  const non2xxByStatus: Record<string, number> = {};
  for (const [status, { count }] of Object.entries(result.statusCodeStats ?? {})) {
    if (!status.startsWith('2')) non2xxByStatus[status] = count ?? 0;
  }
  return {
    rps: result.requests.average,
    p50: l.p50,
    p95,
    p99: l.p99,
    errors: result.errors + result.timeouts + result.non2xx,
    non2xxByStatus,
    connectionErrors: result.errors,
    timeouts: result.timeouts,
  };
}

/** The autocannon run going now, which Ctrl-C stops; after Ctrl-C no further run starts. */
let current: autocannon.Instance | null = null;
let interrupted = false;
let listening = false;

function onInterrupt() {
  interrupted = true;
  current?.stop();
}

/**
 * One autocannon run. Ctrl-C stops the run in progress (its figures still come back) and makes
 * the next one refuse to start, so the bench ends and stops its server. One SIGINT listener
 * serves every run.
 */
export function runAutocannon(options: autocannon.Options): Promise<Result> {
  if (interrupted) return Promise.reject(new Error('the load bench was interrupted'));
  if (!listening) {
    listening = true;
    process.on('SIGINT', onInterrupt);
  }
  return new Promise((resolve, reject) => {
    const instance = autocannon(options, (error, result) => {
      if (current === instance) current = null;
      if (error) reject(error);
      else resolve(result);
    });
    current = instance;
  });
}

export async function runLoadBench(
  seconds = Number(process.env.LOAD_SECONDS ?? 30),
): Promise<Record<string, number>> {
  const app = await startBenchApp();
  const base = app.server.url;
  try {
    const office = await signInCookie(base, 'office@quillmoor.test', demoPassword);
    const auditor = await signInCookie(base, 'auditor@quillmoor.test', demoPassword);
    const headers = (cookie: string) => ({ cookie, origin: base, accept: 'application/json' });

    const list = await (
      await fetch(`${base}/api/assessments?status=signed&pageSize=5`, { headers: headers(office) })
    ).json();
    const readId: string = list.items[0].id;
    const gates = await (
      await fetch(`${base}/api/gates?kind=swing&pageSize=50`, { headers: headers(auditor) })
    ).json();

    const rounds = Math.max(1, Number(process.env.LOAD_ROUNDS ?? 3));
    // Drafts of their own for the autosaving virtual users: a set per slice and one more, since
    // the saves in flight when a slice stops (or lost to a timeout) never hand their draft back.
    const drafts: Array<{ id: string; version: number }> = [];
    for (let i = 0; i < connections * (rounds + 1); i++) {
      const res = await fetch(`${base}/api/assessments`, {
        method: 'POST',
        headers: { ...headers(auditor), 'content-type': 'application/json' },
        body: JSON.stringify({
          gateId: gates.items[i % gates.items.length].id,
          family: 'north-american-gate',
          purpose: 'service',
        }),
      });
      if (!res.ok) throw new Error(`creating a bench draft answered ${res.status}: ${await res.text()}`);
      const draft = await res.json();
      drafts.push({ id: draft.id, version: draft.rowVersion });
    }
    if (new Set(drafts.map((d) => d.id)).size !== drafts.length)
      throw new Error('the bench drafts are not all distinct');
    // Drafts not in flight. A connection takes one when it builds a save and hands it back when
    // the answer arrives (with the new row version on a 200), so no two saves in flight ever
    // share a draft. autocannon clears a connection's context after every answer, hence the
    // pool; taking from the top of a stack, a connection gets back the draft it just returned.
    const idle = [...drafts].reverse();
    // The first answer of each non-2xx status, so the report can say what it was.
    const autosaveSamples: Record<string, string> = {};
    const scoreBody = fs.readFileSync(path.join(projectRoot, 'tests/bench/support/score-body.json'), 'utf8');

    const health: autocannon.Options = { url: `${base}/api/health` };
    const targets: Record<string, autocannon.Options> = {
      archive: { url: `${base}/api/archive?verdict=remedy&sort=-date&limit=25`, headers: headers(office) },
      list: { url: `${base}/api/assessments?status=signed&pageSize=25`, headers: headers(office) },
      read: { url: `${base}/api/assessments/${readId}`, headers: headers(office) },
      score: {
        url: `${base}/api/score`,
        method: 'POST',
        headers: { ...headers(auditor), 'content-type': 'application/json' },
        body: scoreBody,
      },
      // As the walk-through sends it (src/lib/api/client.ts): a merge patch, the minimal answer.
      autosave: {
        url: base,
        headers: {
          ...headers(auditor),
          'content-type': 'application/merge-patch+json',
          prefer: 'return=minimal',
        },
        initialContext: {},
        requests: [
          {
            method: 'PATCH',
            setupRequest: (req, context) => {
              const own = context as { draft?: { id: string; version: number } };
              own.draft ??= idle.pop();
              if (!own.draft) throw new Error('every bench draft is in flight or lost to a timeout');
              return {
                ...req,
                path: `/api/assessments/${own.draft.id}`,
                headers: { ...req.headers, 'if-match': `"${own.draft.version}"` },
                body: JSON.stringify({
                  answers: { latchFitted: { value: 'no', note: `autosave ${Date.now()}` } },
                }),
              };
            },
            onResponse: (status, body, context) => {
              const own = context as { draft?: { id: string; version: number } };
              if (!own.draft) return;
              if (status === 200) own.draft.version = JSON.parse(body).rowVersion;
              else autosaveSamples[status] ??= body.slice(0, 300);
              idle.push(own.draft);
              own.draft = undefined;
            },
          },
        ],
      },
    };

    // LOAD_TARGETS=read,list runs only those (with the two health runs), e.g. to profile one.
    const only = process.env.LOAD_TARGETS?.split(',').filter(Boolean);
    // Each endpoint runs in ROUNDS slices, each right after a slice of /api/health of the same
    // length, and its share is its requests over the health requests of its own slices: the
    // machine is shared, and a neighbour's burst then weighs on both sides of the ratio alike.
    const slice = Math.max(1, Math.round(seconds / rounds));
    const describe = (name: string, f: Figures) => {
      const kinds = [
        ...Object.entries(f.non2xxByStatus).map(([status, count]) => `${status}×${count}`),
        ...(f.connectionErrors ? [`connection errors×${f.connectionErrors}`] : []),
        ...(f.timeouts ? [`timeouts×${f.timeouts}`] : []),
      ];
      return `${name.padEnd(9)} ${f.rps.toFixed(0).padStart(6)} req/s  p50 ${f.p50.toFixed(1)} ms  p95 ${f.p95.toFixed(1)} ms  p99 ${f.p99.toFixed(1)} ms  errors ${f.errors}${kinds.length ? ` (${kinds.join(', ')})` : ''}`;
    };
    /** The mean of the slices' figures (p95 too: a mean of each slice's p95), errors summed. */
    const merge = (parts: Figures[]): Figures => {
      const mean = (pick: (f: Figures) => number) => parts.reduce((a, f) => a + pick(f), 0) / parts.length;
      const non2xxByStatus: Record<string, number> = {};
      for (const f of parts)
        for (const [status, count] of Object.entries(f.non2xxByStatus))
          non2xxByStatus[status] = (non2xxByStatus[status] ?? 0) + count;
      return {
        rps: mean((f) => f.rps),
        p50: mean((f) => f.p50),
        p95: mean((f) => f.p95),
        p99: mean((f) => f.p99),
        errors: parts.reduce((a, f) => a + f.errors, 0),
        non2xxByStatus,
        connectionErrors: parts.reduce((a, f) => a + f.connectionErrors, 0),
        timeouts: parts.reduce((a, f) => a + f.timeouts, 0),
      };
    };
    const out: Record<string, number> = {};
    const allHealth: Figures[] = [];
    for (const [name, options] of Object.entries(targets)) {
      if (name.startsWith('health') || (only && !only.includes(name))) continue;
      const mine: Figures[] = [];
      const ceiling: Figures[] = [];
      for (let round = 0; round < rounds; round++) {
        ceiling.push(figures(await runAutocannon({ connections, duration: slice, ...health })));
        mine.push(figures(await runAutocannon({ connections, duration: slice, ...options })));
      }
      const f = merge(mine);
      const h = merge(ceiling);
      allHealth.push(...ceiling);
      out[`${name}Rps`] = f.rps;
      out[`${name}P50Ms`] = f.p50;
      out[`${name}P95Ms`] = f.p95;
      out[`${name}P99Ms`] = f.p99;
      out[`${name}Errors`] = f.errors;
      out[`${name}VsHealth`] = f.rps / h.rps;
      for (const [status, count] of Object.entries(f.non2xxByStatus)) out[`${name}Status${status}`] = count;
      console.log(
        `${describe(name, f)}  = ${out[`${name}VsHealth`].toFixed(2)} × health in its slices (${h.rps.toFixed(0)} req/s)`,
      );
      if (name === 'autosave')
        for (const [status, body] of Object.entries(autosaveSamples))
          console.log(`          first ${status}: ${body}`);
    }
    const h = merge(allHealth);
    out.healthRps = h.rps;
    out.healthP50Ms = h.p50;
    out.healthP95Ms = h.p95;
    out.healthP99Ms = h.p99;
    out.healthErrors = h.errors;
    console.log(describe('health', h));
    out.connections = connections;
    return out;
  } finally {
    await app.server.stop();
  }
}

if (isMain(import.meta.url)) {
  await runLoadBench(Number(process.argv[2] ?? process.env.LOAD_SECONDS ?? 30));
  process.exit(0);
}
