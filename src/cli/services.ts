/**
 * What `npm start`, `npm test` and the benchmarks run beside the database: a fresh-enough
 * build, the mail catcher and the Node server, each on loopback.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const dataDir = path.resolve(process.env.LATCHWELL_DATA_DIR ?? path.join(projectRoot, '.data'));
const distDir = path.join(projectRoot, 'dist');
/** The server's main (src/serve.ts, bundled by src/integrations/server-entry.ts). */
const serverEntry = path.join(distDir, 'server/serve.mjs');
const buildInputs = [
  'src',
  'public',
  'astro.config.mjs',
  'package.json',
  'package-lock.json',
  'tsconfig.json',
  'knexfile.ts',
  'auth.config.ts',
];

function newestMtime(target: string): number {
  if (!fs.existsSync(target)) return 0;
  const stat = fs.statSync(target);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const entry of fs.readdirSync(target))
    newest = Math.max(newest, newestMtime(path.join(target, entry)));
  return newest;
}

export function buildIsStale(): boolean {
  if (!fs.existsSync(serverEntry)) return true;
  const built = fs.statSync(serverEntry).mtimeMs;
  return buildInputs.some((p) => newestMtime(path.join(projectRoot, p)) > built);
}

/**
 * Runs `astro build` when the build is missing or older than its sources. Concurrent callers
 * (several test runs on one machine) take turns through a lock folder.
 */
export async function ensureBuilt(
  log = console.log,
  quiet = process.env.LATCHWELL_QUIET === '1',
): Promise<void> {
  const lock = path.join(dataDir, 'build.lock');
  fs.mkdirSync(dataDir, { recursive: true });
  const deadline = Date.now() + 5 * 60_000;
  for (;;) {
    try {
      fs.mkdirSync(lock);
      fs.writeFileSync(path.join(lock, 'pid'), String(process.pid));
      break;
    } catch {
      const holder = Number(fs.readFileSync(path.join(lock, 'pid'), { encoding: 'utf8', flag: 'a+' }) || 0);
      let alive = false;
      try {
        if (holder) process.kill(holder, 0);
        alive = holder > 0;
      } catch {
        alive = false;
      }
      if (!alive) fs.rmSync(lock, { recursive: true, force: true });
      else if (Date.now() > deadline) throw new Error('timed out waiting for another build to finish');
      else await new Promise((r) => setTimeout(r, 500));
    }
  }
  try {
    if (!buildIsStale()) return;
    log('[build] building the app (sources changed or no build yet)…');
    const started = performance.now();
    const result = spawnSync(
      process.execPath,
      [path.join(projectRoot, 'node_modules/astro/astro.js'), 'build'],
      {
        cwd: projectRoot,
        stdio: quiet ? 'pipe' : 'inherit',
        encoding: 'utf8',
        maxBuffer: 64 * 1024 * 1024,
      },
    );
    if (result.status !== 0)
      throw new Error(
        `astro build failed${result.stderr ? `:\n${result.stdout?.slice(-4000)}\n${result.stderr}` : ''}`,
      );
    log(`[build] done in ${((performance.now() - started) / 1000).toFixed(1)} s`);
  } finally {
    fs.rmSync(lock, { recursive: true, force: true });
  }
}

/**
 * Copies the current build to `target` so a test run keeps serving the build it started with
 * while another run rebuilds dist/. Packages still resolve from the project's node_modules.
 */
export async function snapshotBuild(target: string): Promise<string> {
  await ensureBuilt(console.log, true);
  fs.rmSync(target, { recursive: true, force: true });
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.cpSync(distDir, target, { recursive: true });
  return path.join(target, 'server/serve.mjs');
}

/** A port on 127.0.0.1 nobody listens on right now. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

/** AUTH_SECRET from env, else one generated once and kept under the data folder. */
export function authSecret(): string {
  if (process.env.AUTH_SECRET) return process.env.AUTH_SECRET;
  const file = path.join(dataDir, 'auth-secret');
  if (!fs.existsSync(file)) {
    fs.mkdirSync(dataDir, { recursive: true });
    fs.writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
  }
  return fs.readFileSync(file, 'utf8').trim();
}

export interface RunningServer {
  url: string;
  port: number;
  child: ChildProcess;
  stop(): Promise<void>;
}

/** Starts the built server and resolves once /api/health answers (any status). */
export async function startAppServer(options: {
  port: number;
  host?: string;
  env: Record<string, string>;
  quiet?: boolean;
  entry?: string;
}): Promise<RunningServer> {
  const host = options.host ?? '127.0.0.1';
  const child = spawn(
    process.execPath,
    [options.entry ?? process.env.LATCHWELL_SERVER_ENTRY ?? serverEntry],
    {
      cwd: projectRoot,
      env: { ...process.env, ...options.env, HOST: host, PORT: String(options.port) },
      stdio: options.quiet ? ['ignore', 'ignore', 'pipe'] : ['ignore', 'inherit', 'inherit'],
    },
  );
  let stderr = '';
  child.stderr?.on('data', (chunk: Buffer) => {
    stderr = (stderr + chunk.toString()).slice(-4000);
  });
  const url = `http://${host}:${options.port}`;
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (child.exitCode !== null || child.signalCode !== null)
      throw new Error(`server exited with ${child.exitCode ?? child.signalCode}: ${stderr}`);
    const ok = await fetch(`${url}/api/health`).then(
      () => true,
      () => false,
    );
    if (ok) break;
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`server did not answer on ${url}: ${stderr}`);
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  return {
    url,
    port: options.port,
    child,
    stop: () =>
      new Promise<void>((resolve) => {
        // A child killed by a signal keeps exitCode null and sets signalCode instead.
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
        setTimeout(() => child.kill('SIGKILL'), 5000).unref();
      }),
  };
}
