/**
 * Backup and restore round trip, on scratch databases of their own (never the shared test
 * database): a database holding signed reports is backed up with its data files, restored
 * into another database and data folder, and every signed report's file still hashes to the
 * SHA-256 its document row records.
 */
import { execFileSync } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import knex, { type Knex } from 'knex';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { backupDatabase, restoreDatabase } from '../../src/cli/backup';
import { createDiskStorage } from '../../src/lib/server/storage/disk';

const suffix = `${process.pid}_${randomBytes(3).toString('hex')}`;
const sourceName = `latchwell_backup_src_${suffix}`;
const targetName = `latchwell_backup_dst_${suffix}`;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-backup-test-'));
const urlFor = (name: string) => {
  const url = new URL(inject('migrationDatabaseUrl'));
  url.pathname = `/${name}`;
  return url.toString();
};

async function admin<T>(fn: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: inject('adminDatabaseUrl') });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/**
 * Migrates with the project's migration files, imported through vitest's own transform (knex's
 * file loader cannot import TypeScript inside a test worker).
 */
async function migrate(db: Knex): Promise<void> {
  const dir = path.resolve(__dirname, '../../db/migrations');
  await db.migrate.latest({
    migrationSource: {
      getMigrations: async () =>
        fs
          .readdirSync(dir)
          .filter((f) => f.endsWith('.ts'))
          .sort(),
      getMigrationName: (name: string) => name,
      getMigration: async (name: string) => import(path.join(dir, name)),
    },
  });
}

let source: Knex;
const documents: { id: string; sha256: string }[] = [];

beforeAll(async () => {
  await admin((c) =>
    c.query(
      `create database "${sourceName}" owner "${decodeURIComponent(new URL(urlFor(sourceName)).username)}"`,
    ),
  );
  source = knex({ client: 'pg', connection: urlFor(sourceName), pool: { min: 0, max: 2 } });
  await migrate(source);
  const files = createDiskStorage(path.join(work, 'source', 'files'));
  const [org] = await source('organisations')
    .insert({ name: 'Backstay Gate Services', slug: `backstay-${suffix}` })
    .returning('id');
  const [user] = await source('users')
    .insert({ organisation_id: org.id, email: `owner.${suffix}@backstay.test`, name: 'Owner', role: 'owner' })
    .returning('id');
  const [client] = await source('clients')
    .insert({ organisation_id: org.id, name: 'Pennine Court', kind: 'business' })
    .returning('id');
  const [site] = await source('sites')
    .insert({
      organisation_id: org.id,
      client_id: client.id,
      address_line1: '9 Pennine Court',
      city: 'Hollins',
      usage_class: 3,
    })
    .returning('id');
  const [gate] = await source('gates')
    .insert({ organisation_id: org.id, site_id: site.id, label: 'Yard gate', kind: 'slide' })
    .returning('id');
  const [ruleset] = await source('rulesets')
    .insert({ organisation_id: org.id, family: 'backup-check', title: 'Backup check' })
    .returning('id');
  const [version] = await source('ruleset_versions')
    .insert({ ruleset_id: ruleset.id, version: '1', content: '{}', content_sha256: '0'.repeat(64) })
    .returning('id');
  for (let i = 0; i < 3; i++) {
    const [assessment] = await source('assessments')
      .insert({
        organisation_id: org.id,
        gate_id: gate.id,
        ruleset_version_id: version.id,
        auditor_id: user.id,
        status: 'signed',
        verdict: 'clear',
        signed_at: new Date().toISOString(),
      })
      .returning('id');
    const pdf = Buffer.concat([
      Buffer.from(`%PDF-1.7\n% backup round trip ${i}\n`),
      randomBytes(2048),
      Buffer.from('\n%%EOF\n'),
    ]);
    const stored = await files.put(pdf, 'application/pdf');
    const [doc] = await source('documents')
      .insert({
        organisation_id: org.id,
        assessment_id: assessment.id,
        kind: 'signed_report',
        sha256: stored.key,
        storage_key: stored.key,
        size_bytes: pdf.byteLength,
        filename: `report-${i}.pdf`,
      })
      .returning(['id', 'sha256']);
    documents.push(doc);
  }
}, 120_000);

afterAll(async () => {
  await source?.destroy();
  await admin(async (c) => {
    await c.query(`drop database if exists "${sourceName}" with (force)`);
    await c.query(`drop database if exists "${targetName}" with (force)`);
  });
  fs.rmSync(work, { recursive: true, force: true });
});

describe('backup and restore', () => {
  it('round-trips a database with signed reports and their files; every file still matches its recorded SHA-256', async () => {
    const out = path.join(work, 'backups', 'latchwell.tar');
    const manifest = await backupDatabase({
      databaseUrl: urlFor(sourceName),
      dataDir: path.join(work, 'source'),
      out,
    });
    expect(manifest).toMatchObject({ format: 'latchwell-backup/1', database: sourceName, files: 3 });
    expect(manifest.serverVersion).toMatch(/^\d+/);

    const report = await restoreDatabase({
      from: out,
      databaseUrl: urlFor(targetName),
      adminUrl: inject('adminDatabaseUrl'),
      dataDir: path.join(work, 'restored'),
    });
    expect(report).toMatchObject({ filesRestored: 3, corruptFiles: [] });

    const restored = knex({ client: 'pg', connection: urlFor(targetName), pool: { min: 0, max: 1 } });
    try {
      const rows = await restored('documents')
        .where({ kind: 'signed_report' })
        .orderBy('id')
        .select('id', 'sha256', 'storage_key');
      expect(rows.map((r) => ({ id: r.id, sha256: r.sha256 }))).toEqual(
        [...documents].sort((a, b) => a.id.localeCompare(b.id)),
      );
      const files = createDiskStorage(path.join(work, 'restored', 'files'));
      for (const row of rows) {
        const bytes = await files.get(row.storage_key);
        expect(bytes, row.id).not.toBeNull();
        expect(createHash('sha256').update(bytes!).digest('hex')).toBe(row.sha256);
      }
      // The schema came back whole: triggers still guard the signed archive.
      await expect(
        restored('documents').where({ id: rows[0]!.id }).update({ filename: 'renamed.pdf' }),
      ).rejects.toThrow(/signed archive/);
      const [{ n }] = await restored('knex_migrations').count({ n: '*' });
      const [{ m }] = await source('knex_migrations').count({ m: '*' });
      expect(Number(n)).toBe(Number(m));
    } finally {
      await restored.destroy();
    }
  }, 120_000);

  it('refuses a file that is not a Latchwell backup', async () => {
    const bogus = path.join(work, 'bogus.tar');
    fs.writeFileSync(path.join(work, 'manifest.json'), JSON.stringify({ format: 'something-else' }));
    execFileSync('tar', ['-cf', bogus, '-C', work, 'manifest.json']);
    await expect(
      restoreDatabase({
        from: bogus,
        databaseUrl: urlFor(targetName),
        adminUrl: inject('adminDatabaseUrl'),
        dataDir: path.join(work, 'nowhere'),
      }),
    ).rejects.toThrow(/not a Latchwell backup/);
  });
});
