/**
 * Ruleset storage: a published version is a record of what was applied, so the database itself
 * refuses to change or delete it (trigger `ruleset_versions_guard`), while drafts stay editable;
 * publishing the shipped files is idempotent, and a file changed under an already-published
 * version number is refused with an error that says what to do.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest';
import { publishRulesetFiles } from '../../src/cli/publish-rulesets';
import { contentSha256, loadRulesetFile } from '../../src/lib/rules';
import { createOrganisation, testDb, type FixtureOrganisation } from './support/fixtures';

const shippedFile = path.resolve(__dirname, '../../rulesets/north-american-gate/2026.1.json');

let org: FixtureOrganisation;
let familyId: string;
let document: Record<string, unknown>;

/** A local family of the organisation holding one published and one draft version, written with raw SQL. */
async function insertVersion(version: string, status: 'draft' | 'published'): Promise<string> {
  const content = { ...document, family: 'storage-check', version };
  const [row] = await testDb()('ruleset_versions')
    .insert({
      ruleset_id: familyId,
      version,
      content: JSON.stringify(content),
      content_sha256: contentSha256(content),
      status,
      published_at: status === 'published' ? testDb().fn.now() : null,
    })
    .returning('id');
  return row.id;
}

beforeAll(async () => {
  org = await createOrganisation('rulesets-storage');
  document = JSON.parse(fs.readFileSync(shippedFile, 'utf8'));
  const [family] = await testDb()('rulesets')
    .insert({
      organisation_id: org.id,
      family: 'storage-check',
      title: 'Storage check family',
      based_on_family: 'north-american-gate',
    })
    .returning('id');
  familyId = family.id;
});

describe('the published-version guard (raw SQL)', () => {
  it("refuses an UPDATE of a published version's content", async () => {
    const id = await insertVersion('2026.1-local.1', 'published');
    await expect(
      testDb().raw(
        `update ruleset_versions set content = jsonb_set(content, '{summary}', '"quietly edited"') where id = ?`,
        [id],
      ),
    ).rejects.toThrow(/is published and its content cannot change/);
    await expect(
      testDb().raw(`update ruleset_versions set content_sha256 = ? where id = ?`, ['f'.repeat(64), id]),
    ).rejects.toThrow(/cannot change/);
    const row = await testDb()('ruleset_versions').where({ id }).first('content');
    expect(row.content.summary).toBe(document.summary);
  });

  it('refuses a DELETE of a published version', async () => {
    const id = await insertVersion('2026.1-local.2', 'published');
    await expect(testDb().raw('delete from ruleset_versions where id = ?', [id])).rejects.toThrow(
      /is published and cannot be deleted/,
    );
    expect(await testDb()('ruleset_versions').where({ id }).first('id')).toBeDefined();
  });

  it('refuses taking a published version back to draft, but lets it be retired', async () => {
    const id = await insertVersion('2026.1-local.3', 'published');
    await expect(
      testDb().raw(`update ruleset_versions set status = 'draft' where id = ?`, [id]),
    ).rejects.toThrow(/cannot go from published to draft/);
    await testDb().raw(`update ruleset_versions set status = 'retired' where id = ?`, [id]);
    expect((await testDb()('ruleset_versions').where({ id }).first('status')).status).toBe('retired');
    await expect(
      testDb().raw(`update ruleset_versions set content = '{}'::jsonb where id = ?`, [id]),
    ).rejects.toThrow(/is retired and its content cannot change/);
  });

  it("allows an UPDATE of a draft's content, and its deletion", async () => {
    const id = await insertVersion('2026.1-local.4', 'draft');
    await testDb().raw(
      `update ruleset_versions set content = jsonb_set(content, '{summary}', '"edited while a draft"') where id = ?`,
      [id],
    );
    expect((await testDb()('ruleset_versions').where({ id }).first('content')).content.summary).toBe(
      'edited while a draft',
    );
    await testDb().raw('delete from ruleset_versions where id = ?', [id]);
    expect(await testDb()('ruleset_versions').where({ id }).first('id')).toBeUndefined();
  });
});

describe('npm run rulesets:publish', () => {
  // A throwaway shipped family in its own folder. Its name sorts after the real families, so a
  // test that picks "the first published family" keeps picking a real one.
  const family = `zz-publish-check-${randomBytes(3).toString('hex')}`;
  let root: string;
  let file: string;

  beforeAll(() => {
    root = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-rulesets-'));
    fs.mkdirSync(path.join(root, family));
    file = path.join(root, family, '2026.1.json');
    fs.writeFileSync(
      file,
      JSON.stringify({ ...document, family, familyTitle: 'Publish check family (test only)' }, null, 2),
    );
  });
  afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

  it('publishes a new file once, and a second run changes nothing', async () => {
    const url = inject('migrationDatabaseUrl');
    expect(await publishRulesetFiles(url, root)).toEqual([`${family} 2026.1`]);
    const before = await testDb()('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where('r.family', family)
      .select('rv.id', 'rv.content_sha256', 'rv.published_at');
    expect(await publishRulesetFiles(url, root)).toEqual([]);
    const after = await testDb()('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where('r.family', family)
      .select('rv.id', 'rv.content_sha256', 'rv.published_at');
    expect(after).toEqual(before);
    expect(before).toHaveLength(1);
    expect(before[0].content_sha256).toBe(
      loadRulesetFile(JSON.parse(fs.readFileSync(file, 'utf8'))).contentSha256,
    );
  });

  it('publishing the repository files again is a no-op', async () => {
    expect(await publishRulesetFiles(inject('migrationDatabaseUrl'))).toEqual([]);
  });

  it('refuses a changed file under a version number that is already published, naming the file and what to do', async () => {
    const url = inject('migrationDatabaseUrl');
    await publishRulesetFiles(url, root);
    const original = fs.readFileSync(file, 'utf8');
    const changed = JSON.parse(original);
    const severityBefore = changed.rules[0].severity;
    changed.rules[0].severity = severityBefore === 'minor' ? 'major' : 'minor';
    fs.writeFileSync(file, JSON.stringify(changed, null, 2));
    try {
      const refusal = publishRulesetFiles(url, root);
      await expect(refusal).rejects.toThrow(`${family}/2026.1.json`);
      await expect(refusal).rejects.toThrow(
        /already published with different content; publish it under a new version number/,
      );
    } finally {
      fs.writeFileSync(file, original);
    }
    const stored = await testDb()('ruleset_versions as rv')
      .join('rulesets as r', 'r.id', 'rv.ruleset_id')
      .where('r.family', family)
      .first('rv.content');
    expect(stored.content.rules[0].severity).toBe(severityBefore);
  });

  it('refuses a file that is not a valid ruleset, with the path of the field at fault', async () => {
    const broken = path.join(root, family, '2026.2.json');
    const content = JSON.parse(fs.readFileSync(shippedFile, 'utf8'));
    fs.writeFileSync(
      broken,
      JSON.stringify({
        ...content,
        family,
        version: '2026.2',
        rules: [{ ...content.rules[0], severity: 'catastrophic' }],
      }),
    );
    try {
      await expect(publishRulesetFiles(inject('migrationDatabaseUrl'), root)).rejects.toThrow(
        /2026\.2\.json[\s\S]*rules\[0\]\.severity/,
      );
    } finally {
      fs.rmSync(broken);
    }
  });
});
