import pg from 'pg';
import { describe, expect, it } from 'vitest';
import { spawnSync, execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, projectRoot } from '../../src/cli/services';

/** Runs the launcher CLI against its own throw-away cluster (own data folder and port). */
function launcher(command: string, env: Record<string, string>) {
  const { DATABASE_URL: _ignored, ...rest } = process.env;
  return spawnSync(
    process.execPath,
    [path.join(projectRoot, 'node_modules/tsx/dist/cli.mjs'), 'db/launcher.ts', command],
    {
      cwd: projectRoot,
      env: { ...rest, ...env },
      encoding: 'utf8',
      timeout: 90_000,
    },
  );
}

describe('the database launcher', () => {
  it(
    'is idempotent: a second start, a stale pid file and a stop are all fine',
    { timeout: 120_000 },
    async () => {
      const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-launcher-'));
      fs.chmodSync(dataDir, 0o755);
      const env = {
        LATCHWELL_DATA_DIR: dataDir,
        LATCHWELL_PG_PORT: String(await freePort()),
        LATCHWELL_PG_FSYNC: 'off',
      };
      try {
        const first = launcher('start', env);
        expect(first.status, first.stderr).toBe(0);
        expect(first.stdout).toContain('initialising a private cluster');
        const url = first.stdout.trim().split('\n').at(-1)!;
        expect(url).toMatch(new RegExp(`^postgres://.*@127\\.0\\.0\\.1:${env.LATCHWELL_PG_PORT}/latchwell$`));
        // What it prints is the app role's address, not the superuser's.
        expect(new URL(url).username).toBe('latchwell_app');

        // A database from before the owner role (the superuser owns it and its tables) is handed over on the next start.
        const superuserUrl = new URL(url);
        superuserUrl.username = 'latchwell';
        superuserUrl.password = process.env.LATCHWELL_PG_PASSWORD ?? 'latchwell-local';
        const su = new pg.Client({ connectionString: superuserUrl.toString() });
        await su.connect();
        await su.query('alter database latchwell owner to latchwell');
        await su.query('create table legacy_probe (id serial primary key)');
        await su.end();

        const second = launcher('start', env);
        expect(second.status, second.stderr).toBe(0);
        expect(second.stdout).toContain('handing database latchwell to latchwell_owner');
        const check = new pg.Client({ connectionString: superuserUrl.toString() });
        await check.connect();
        const owners = await check.query(
          `select (select pg_get_userbyid(datdba) from pg_database where datname = 'latchwell') as db,
                (select tableowner from pg_tables where tablename = 'legacy_probe') as tbl,
                (select pg_get_userbyid(relowner) from pg_class where relname = 'legacy_probe_id_seq') as seq`,
        );
        await check.end();
        expect(owners.rows[0]).toEqual({
          db: 'latchwell_owner',
          tbl: 'latchwell_owner',
          seq: 'latchwell_owner',
        });
        expect(second.stdout).not.toContain('initialising');
        expect(second.stdout).not.toContain('starting PostgreSQL');
        expect(second.stdout.trim().split('\n').at(-1)).toBe(url);

        // Kill the server hard: its pid file stays behind, naming a process that is gone.
        const pidFile = path.join(dataDir, 'postgres', 'postmaster.pid');
        const pid = Number(fs.readFileSync(pidFile, 'utf8').split('\n')[0]);
        execFileSync('kill', ['-9', String(pid)]);
        for (let i = 0; i < 50 && fs.existsSync(`/proc/${pid}`); i++)
          await new Promise((r) => setTimeout(r, 100));
        expect(fs.existsSync(pidFile)).toBe(true);

        const third = launcher('start', env);
        expect(third.status, third.stderr).toBe(0);
        expect(third.stdout).toContain('starting PostgreSQL');
        expect(launcher('status', env).stdout.trim()).toBe('running');

        expect(launcher('stop', env).status).toBe(0);
        expect(launcher('status', env).stdout.trim()).toBe('stopped');
        expect(launcher('stop', env).status).toBe(0); // stopping twice is fine
      } finally {
        launcher('stop', env);
        fs.rmSync(dataDir, { recursive: true, force: true });
      }
    },
  );
});
