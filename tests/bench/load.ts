/**
 * Load on loopback with autocannon: 50 connections for 30 s each against the archive list, an
 * assessment read, the score endpoint and an autosave, then /api/health of the same server as
 * the ceiling. Prints requests/s, p50/p95/p99 latency and errors, and the ratio to health.
 * Bounded in time; traffic goes to 127.0.0.1 only.
 *
 * `npx tsx tests/bench/load.ts [seconds]` (default 30).
 */
import autocannon, { type Result } from 'autocannon';
import fs from 'node:fs';
import path from 'node:path';
import { demoPassword } from '../../db/seeds/demo/people';
import { projectRoot } from '../../src/cli/services';
import { isMain } from '../../src/cli/is-main';
import { signInCookie, startBenchApp } from './support/app';

const connections = 50;

interface Figures {
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
}

/** autocannon's histogram has p97.5 and p99; p95 is interpolated between p90 and p97.5. */
function figures(result: Result): Figures {
  const l = result.latency as unknown as Record<string, number>;
  const p95 = l.p90 + ((l.p97_5 - l.p90) * (95 - 90)) / (97.5 - 90);
  return { rps: result.requests.average, p50: l.p50, p95, p99: l.p99, errors: result.errors + result.timeouts + result.non2xx };
}

function run(options: autocannon.Options): Promise<Result> {
  return new Promise((resolve, reject) => {
    const instance = autocannon(options, (error, result) => (error ? reject(error) : resolve(result)));
    process.once('SIGINT', () => instance.stop());
  });
}

export async function runLoadBench(seconds = Number(process.env.LOAD_SECONDS ?? 30)): Promise<Record<string, number>> {
  const app = await startBenchApp();
  const base = app.server.url;
  try {
    const office = await signInCookie(base, 'office@quillmoor.test', demoPassword);
    const auditor = await signInCookie(base, 'auditor@quillmoor.test', demoPassword);
    const headers = (cookie: string) => ({ cookie, origin: base, accept: 'application/json' });

    const list = await (await fetch(`${base}/api/assessments?status=signed&pageSize=5`, { headers: headers(office) })).json();
    const readId: string = list.items[0].id;
    const gates = await (await fetch(`${base}/api/gates?kind=swing&pageSize=50`, { headers: headers(auditor) })).json();

    // One draft per connection, so autosaves exercise the row-version protocol without colliding.
    const drafts: Array<{ id: string; version: number }> = [];
    for (let i = 0; i < connections; i++) {
      const res = await fetch(`${base}/api/assessments`, {
        method: 'POST',
        headers: { ...headers(auditor), 'content-type': 'application/json' },
        body: JSON.stringify({ gateId: gates.items[i % gates.items.length].id, family: 'north-american-gate', purpose: 'service' }),
      });
      const draft = await res.json();
      drafts.push({ id: draft.id, version: draft.rowVersion });
    }
    const scoreBody = fs.readFileSync(path.join(projectRoot, 'tests/bench/support/score-body.json'), 'utf8');

    const targets: Record<string, autocannon.Options> = {
      archive: { url: `${base}/api/archive?verdict=remedy&sort=-date&limit=25`, headers: headers(office) },
      read: { url: `${base}/api/assessments/${readId}`, headers: headers(office) },
      score: { url: `${base}/api/score`, method: 'POST', headers: { ...headers(auditor), 'content-type': 'application/json' }, body: scoreBody },
      autosave: {
        url: base,
        headers: { ...headers(auditor), 'content-type': 'application/json' },
        initialContext: {},
        requests: [
          {
            method: 'PATCH',
            // Each connection keeps its own draft and row version in its context.
            setupRequest: (req, context) => {
              const own = context as { draft?: { id: string; version: number } };
              own.draft ??= drafts[autosaveNext++ % drafts.length];
              return {
                ...req,
                path: `/api/assessments/${own.draft.id}`,
                headers: { ...req.headers, 'if-match': `"${own.draft.version}"` },
                body: JSON.stringify({ answers: { latchFitted: { value: 'no', note: `autosave ${Date.now()}` } } }),
              };
            },
            onResponse: (status, body, context) => {
              const own = context as { draft?: { version: number } };
              if (status === 200 && own.draft) own.draft.version = JSON.parse(body).rowVersion;
            },
          },
        ],
      },
      health: { url: `${base}/api/health` },
    };
    let autosaveNext = 0;

    const out: Record<string, number> = {};
    for (const [name, options] of Object.entries(targets)) {
      const result = await run({ connections, duration: seconds, ...options });
      const f = figures(result);
      out[`${name}Rps`] = f.rps;
      out[`${name}P50Ms`] = f.p50;
      out[`${name}P95Ms`] = f.p95;
      out[`${name}P99Ms`] = f.p99;
      out[`${name}Errors`] = f.errors;
      console.log(
        `${name.padEnd(9)} ${f.rps.toFixed(0).padStart(6)} req/s  p50 ${f.p50.toFixed(1)} ms  p95 ${f.p95.toFixed(1)} ms  p99 ${f.p99.toFixed(1)} ms  errors ${f.errors}`,
      );
    }
    for (const name of ['archive', 'read', 'score', 'autosave']) out[`${name}VsHealth`] = out[`${name}Rps`] / out.healthRps;
    return out;
  } finally {
    await app.server.stop();
  }
}

if (isMain(import.meta.url)) {
  await runLoadBench(Number(process.argv[2] ?? process.env.LOAD_SECONDS ?? 30));
  process.exit(0);
}
