/**
 * Backups of a Latchwell installation: the database (pg_dump custom format) and the data
 * files folder (photos, PDFs, signatures: content-addressed, so each file's name is its
 * SHA-256), in one tar file with a manifest.
 *
 * pg_dump / pg_restore come from the bin folder of the PostgreSQL major version the server
 * runs (Debian's /usr/lib/postgresql/<major>/bin, the same place db/launcher.ts starts the
 * server from), so the dump format always matches the server. The password travels in the
 * environment (PGPASSWORD), never on a command line.
 *
 * A restore replaces the target database as a whole (drop, create, pg_restore) and copies
 * the files back, checking every file against its name.
 */
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';

export interface BackupManifest {
  format: 'latchwell-backup/1';
  createdAt: string;
  database: string;
  serverVersion: string;
  dumpSha256: string;
  dumpBytes: number;
  files: number;
}

/** Runs a command, rejecting with its stderr on a non-zero exit. */
function run(command: string, args: string[], env: NodeJS.ProcessEnv = process.env): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { env, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => (stderr = (stderr + chunk.toString()).slice(-4000)));
    child.on('error', reject);
    child.on('close', (code) =>
      code === 0
        ? resolve()
        : reject(new Error(`${path.basename(command)} exited with ${code}: ${stderr.trim()}`)),
    );
  });
}

/** libpq environment for a connection URL (so no password appears in a process list). */
export function libpqEnv(databaseUrl: string): NodeJS.ProcessEnv {
  const url = new URL(databaseUrl);
  return {
    ...process.env,
    PGHOST: url.hostname,
    PGPORT: url.port || '5432',
    PGUSER: decodeURIComponent(url.username),
    PGPASSWORD: decodeURIComponent(url.password),
    PGDATABASE: decodeURIComponent(url.pathname.slice(1)),
  };
}

/** The server's version, and the bin folder of matching client tools (PATH as a last resort). */
export async function serverTools(
  databaseUrl: string,
): Promise<{ serverVersion: string; bin: (tool: string) => string }> {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  let serverVersion: string;
  let major: number;
  try {
    const { rows } = await client.query<{ server_version: string; num: string }>(
      "select current_setting('server_version') as server_version, current_setting('server_version_num') as num",
    );
    serverVersion = rows[0]!.server_version;
    major = Math.floor(Number(rows[0]!.num) / 10000);
  } finally {
    await client.end();
  }
  const dir = `/usr/lib/postgresql/${major}/bin`;
  const haveDir = await fs.stat(path.join(dir, 'pg_dump')).then(
    () => true,
    () => false,
  );
  return { serverVersion, bin: (tool) => (haveDir ? path.join(dir, tool) : tool) };
}

async function sha256File(file: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/** Every file under `dir` (relative paths); empty when it does not exist. */
async function filesUnder(dir: string): Promise<string[]> {
  const entries = await fs.readdir(dir, { recursive: true, withFileTypes: true }).catch(() => []);
  return entries
    .filter((e) => e.isFile() && !e.name.endsWith('.tmp'))
    .map((e) => path.relative(dir, path.join(e.parentPath, e.name)));
}

export interface BackupOptions {
  databaseUrl: string;
  /** The data folder whose `files/` is backed up (LATCHWELL_DATA_DIR). */
  dataDir: string;
  /** The tar file to write. */
  out: string;
}

/** Writes `out`: manifest.json, database.dump and files/… in one tar. */
export async function backupDatabase(options: BackupOptions): Promise<BackupManifest> {
  const { serverVersion, bin } = await serverTools(options.databaseUrl);
  const work = await fs.mkdtemp(path.join(os.tmpdir(), 'latchwell-backup-'));
  try {
    const dump = path.join(work, 'database.dump');
    await run(
      bin('pg_dump'),
      ['--format=custom', '--no-owner', '--no-privileges', `--file=${dump}`],
      libpqEnv(options.databaseUrl),
    );
    const filesDir = path.join(options.dataDir, 'files');
    const files = await filesUnder(filesDir);
    const manifest: BackupManifest = {
      format: 'latchwell-backup/1',
      createdAt: new Date().toISOString(),
      database: new URL(options.databaseUrl).pathname.slice(1),
      serverVersion,
      dumpSha256: await sha256File(dump),
      dumpBytes: (await fs.stat(dump)).size,
      files: files.length,
    };
    await fs.writeFile(path.join(work, 'manifest.json'), `${JSON.stringify(manifest, null, 2)}\n`);
    await fs.mkdir(path.dirname(path.resolve(options.out)), { recursive: true });
    const partial = `${options.out}.partial`;
    const tarArgs = ['-cf', partial, '-C', work, 'manifest.json', 'database.dump'];
    if (files.length) tarArgs.push('-C', options.dataDir, 'files');
    await run('tar', tarArgs);
    await fs.rename(partial, options.out);
    return manifest;
  } finally {
    await fs.rm(work, { recursive: true, force: true });
  }
}

export interface RestoreOptions {
  /** The backup tar. */
  from: string;
  /** The database to replace with the backup (dropped and created). */
  databaseUrl: string;
  /** A connection to another database of the same server, used to drop and create the target. */
  adminUrl: string;
  /** The data folder to copy files/ into. */
  dataDir: string;
}

export interface RestoreReport {
  manifest: BackupManifest;
  filesRestored: number;
  /** Restored files whose bytes do not hash to their name. */
  corruptFiles: string[];
}

/** Replaces the target database with the backup's and copies its files back. */
export async function restoreDatabase(options: RestoreOptions): Promise<RestoreReport> {
  const work = await fs.mkdtemp(path.join(os.tmpdir(), 'latchwell-restore-'));
  try {
    await run('tar', ['-xf', options.from, '-C', work]);
    const manifest = JSON.parse(
      await fs.readFile(path.join(work, 'manifest.json'), 'utf8'),
    ) as BackupManifest;
    if (manifest.format !== 'latchwell-backup/1')
      throw new Error(`${options.from} is not a Latchwell backup (format ${String(manifest.format)})`);
    const dump = path.join(work, 'database.dump');
    if ((await sha256File(dump)) !== manifest.dumpSha256)
      throw new Error('the database dump in the backup does not match its recorded SHA-256');

    const database = decodeURIComponent(new URL(options.databaseUrl).pathname.slice(1));
    if (!/^[A-Za-z0-9_]+$/.test(database))
      throw new Error(`refusing to restore into a database named ${JSON.stringify(database)}`);
    const admin = new pg.Client({ connectionString: options.adminUrl });
    await admin.connect();
    try {
      await admin.query(`drop database if exists "${database}" with (force)`);
      // Owned by the role that restores into it (the owner role), as migrations expect.
      await admin.query(
        `create database "${database}" owner "${decodeURIComponent(new URL(options.databaseUrl).username).replace(/"/g, '""')}"`,
      );
    } finally {
      await admin.end();
    }
    const { bin } = await serverTools(options.databaseUrl);
    await run(
      bin('pg_restore'),
      ['--no-owner', '--no-privileges', '--exit-on-error', `--dbname=${database}`, dump],
      libpqEnv(options.databaseUrl),
    );

    const restoredFiles = path.join(work, 'files');
    const files = await filesUnder(restoredFiles);
    const corruptFiles: string[] = [];
    for (const relative of files) {
      const source = path.join(restoredFiles, relative);
      const target = path.join(options.dataDir, 'files', relative);
      if ((await sha256File(source)) !== path.basename(relative)) {
        corruptFiles.push(relative);
        continue;
      }
      // Content-addressed: a file already there under this name holds these bytes.
      if (
        await fs.stat(target).then(
          () => true,
          () => false,
        )
      )
        continue;
      await fs.mkdir(path.dirname(target), { recursive: true });
      await fs.copyFile(source, target);
      await fs.chmod(target, 0o444);
    }
    return { manifest, filesRestored: files.length, corruptFiles };
  } finally {
    await fs.rm(work, { recursive: true, force: true });
  }
}
