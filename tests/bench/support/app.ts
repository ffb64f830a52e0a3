/**
 * What the benchmarks stand on: a scratch database with the demo scenario (kept between runs,
 * seeded once), the current build, and a server on a free loopback port; plus a staff sign-in
 * over real HTTP that returns the session cookie.
 */
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import pg from 'pg';
import { adoptDatabase, appUrlFor, ensureDatabase } from '../../../db/launcher';
import { migrateLatest } from '../../../src/cli/migrate';
import { publishRulesetFiles } from '../../../src/cli/publish-rulesets';
import { seedIfEmpty } from '../../../src/cli/seed';
import { ensureBuilt, freePort, startAppServer, type RunningServer } from '../../../src/cli/services';

export interface BenchApp {
  server: RunningServer;
  databaseUrl: string;
  adminUrl: string;
}

/** The bench database: created, migrated and seeded with the demo scenario when missing. */
export async function benchDatabase(name = 'latchwell_bench'): Promise<{ url: string; adminUrl: string }> {
  const endpoints = await ensureDatabase();
  const admin = new pg.Client({ connectionString: endpoints.adminUrl });
  await admin.connect();
  const exists = (await admin.query('select 1 from pg_database where datname = $1', [name])).rowCount;
  const url = new URL(endpoints.migrationUrl);
  url.pathname = `/${name}`;
  if (!exists) await admin.query(`create database "${name}" owner "${decodeURIComponent(url.username)}"`);
  await admin.end();
  await adoptDatabase(name); // kept from a run before the owner role existed
  // Migrated and seeded as the owner role; the server gets the app role's address.
  await migrateLatest(url.toString(), endpoints.appRole);
  await publishRulesetFiles(url.toString());
  if (await seedIfEmpty(url.toString())) console.log(`[bench] seeded the demo scenario into ${name}`);
  return { url: appUrlFor(endpoints, url.toString()), adminUrl: endpoints.adminUrl };
}

/**
 * With BENCH_CPU_PROF_DIR set, the server samples its CPU as `node --cpu-prof` would (see
 * cpu-profile.mjs) and writes the profile there when the bench stops it (open it in Chrome's DevTools, or summarise it with
 * `npx tsx tests/bench/support/profile-top.ts <file>`).
 */
function profilingOptions(): Record<string, string> {
  const dir = process.env.BENCH_CPU_PROF_DIR;
  if (!dir) return {};
  const hook = path.join(path.dirname(fileURLToPath(import.meta.url)), 'cpu-profile.mjs');
  return { BENCH_CPU_PROF_DIR: path.resolve(dir), NODE_OPTIONS: `--import=${pathToFileURL(hook).href}` };
}

export async function startBenchApp(env: Record<string, string> = {}): Promise<BenchApp> {
  const { url, adminUrl } = await benchDatabase();
  await ensureBuilt();
  const server = await startAppServer({
    port: await freePort(),
    quiet: true,
    env: {
      DATABASE_URL: url,
      SMTP_URL: 'smtp://127.0.0.1:9', // nothing listens: mail stays queued, which is fine here
      AUTH_SECRET: 'bench-secret-0123456789abcdef0123456789',
      AUTH_TRUST_HOST: 'true',
      OUTBOX_WORKER: 'off',
      DB_POOL_MAX: process.env.DB_POOL_MAX ?? '20',
      ...profilingOptions(),
      ...env,
    },
  });
  return { server, databaseUrl: url, adminUrl };
}

/** Signs a staff member in through auth core (CSRF token, credentials callback); returns the Cookie header. */
export async function signInCookie(baseUrl: string, email: string, password: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair.indexOf('=');
      jar.set(pair.slice(0, eq).trim(), pair.slice(eq + 1).trim());
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const csrf = await fetch(`${baseUrl}/api/auth/csrf`, { headers: { accept: 'application/json' } });
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${baseUrl}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: cookie(), origin: baseUrl },
    body: new URLSearchParams({ email, password, csrfToken, callbackUrl: '/' }),
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes('session-token')))
    throw new Error(`sign-in of ${email} failed (${res.status})`);
  return cookie();
}
