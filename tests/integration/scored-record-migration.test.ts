/**
 * The scored-record migration on a database that already holds submitted assessments: a signed
 * one with a gate snapshot gets a record built from the snapshot (the gate as it was scored,
 * even though the gate row changed since) and its stored result, marked as backfilled; a draft
 * gets none; the signed row is otherwise unchanged; and the migration goes down and up again.
 */
import { describe, expect, it } from 'vitest';
import { runTsx, useScratchDatabase } from './support/scratch-database';

const scratch = useScratchDatabase('latchwell_record');

/** Runs in a tsx child: knex loads .ts migrations with Node's own import(). */
const script = (url: string) => `
  const { default: knex } = await import('knex');
  const { knexConfig } = await import('./knexfile.ts');
  const k = knex(knexConfig(${JSON.stringify(url)}));
  try {
    const all = (await k.migrate.list())[1].map((m) => m.file);
    const before = all.filter((f) => f < '20261204160000_scored_record.ts');
    for (const name of before) await k.migrate.up({ name });
    const [org] = await k('organisations').insert({ name: 'Backfill Gates', slug: 'backfill-' + Date.now() }).returning('id');
    const [user] = await k('users').insert({ organisation_id: org.id, email: 'auditor.' + Date.now() + '@backfill.test', name: 'Ada Walker', role: 'auditor' }).returning('id');
    const [client] = await k('clients').insert({ organisation_id: org.id, name: 'Hollins Household', kind: 'homeowner', contact_email: 'hollins@backfill.test' }).returning('id');
    const [site] = await k('sites').insert({ organisation_id: org.id, client_id: client.id, address_line1: '3 Now Street', city: 'Laterby', postal_code: 'LB1', usage_class: 1 }).returning('id');
    const [gate] = await k('gates').insert({ organisation_id: org.id, site_id: site.id, label: 'Gate renamed later', kind: 'swing', leaves: 'single', width_mm: 4000 }).returning('id');
    const [ruleset] = await k('rulesets').insert({ organisation_id: org.id, family: 'backfill-family', title: 'Backfill checks' }).returning('id');
    const [version] = await k('ruleset_versions').insert({ ruleset_id: ruleset.id, version: '1', content: JSON.stringify({ areas: [{ key: 'pinch', title: 'Pinch' }] }), content_sha256: 'a'.repeat(64), status: 'published', published_at: k.fn.now() }).returning('id');
    const result = { ruleset: { family: 'backfill-family', version: '1', contentSha256: 'a'.repeat(64) }, verdict: 'clear', complete: true, findings: [], areaScores: {} };
    const snapshot = { id: gate.id, siteId: site.id, label: 'Gate as scored', kind: 'swing', leaves: 'single', widthMm: 3000, site: { id: site.id, addressLine1: '1 Then Street', city: 'Earlyton', usageClass: 1 }, client: { id: client.id, name: 'Hollins Household' } };
    const [signed] = await k('assessments').insert({ organisation_id: org.id, gate_id: gate.id, ruleset_version_id: version.id, auditor_id: user.id, status: 'signed', result: JSON.stringify(result), result_sha256: 'b'.repeat(64), verdict: 'clear', gate_snapshot: JSON.stringify(snapshot), submitted_at: k.fn.now(), signed_at: k.fn.now() }).returning('id');
    const [draft] = await k('assessments').insert({ organisation_id: org.id, gate_id: gate.id, ruleset_version_id: version.id, auditor_id: user.id }).returning('id');
    const rowBefore = await k('assessments').where({ id: signed.id }).first();
    await k.migrate.latest();
    const rowAfter = await k('assessments').where({ id: signed.id }).first();
    const draftAfter = await k('assessments').where({ id: draft.id }).first('scored_record');
    let refused = null;
    try { await k('assessments').where({ id: signed.id }).update({ scored_record: null }); } catch (e) { refused = e.message; }
    const { scored_record: record, ...rest } = rowAfter;
    const undone = [];
    for (;;) {
      const [, names] = await k.migrate.down();
      undone.push(...names);
      if (!names.length || names.some((n) => n.startsWith('20261204160000_'))) break;
    }
    const columnGone = (await k.raw("select count(*)::int as n from information_schema.columns where table_name = 'assessments' and column_name = 'scored_record'")).rows[0].n === 0;
    await k.migrate.latest();
    const again = (await k('assessments').where({ id: signed.id }).first('scored_record')).scored_record;
    console.log(JSON.stringify({ record, restSame: Object.keys(rowBefore).every((c) => JSON.stringify(rest[c]) === JSON.stringify(rowBefore[c])), draft: draftAfter.scored_record, refused, undone, columnGone, againSource: again?.source ?? null }));
  } finally {
    await k.destroy();
  }
`;

describe('the scored-record migration', () => {
  it('backfills submitted rows from their snapshot and stored result, leaves drafts alone, and reverses', () => {
    const run = runTsx(script(scratch.url));
    expect(run.status, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout.trim().split('\n').pop()!);
    expect(out.record).toMatchObject({
      format: 1,
      source: 'backfill',
      gate: { label: 'Gate as scored', widthMm: 3000, leaves: 'single' },
      site: { addressLine1: '1 Then Street', city: 'Earlyton', postalCode: 'LB1' },
      client: { name: 'Hollins Household', contactEmail: 'hollins@backfill.test' },
      ruleset: { family: 'backfill-family', version: '1', title: 'Backfill checks' },
      result: { verdict: 'clear' },
      resultSha256: 'b'.repeat(64),
    });
    expect(out.restSame).toBe(true);
    expect(out.draft).toBeNull();
    expect(out.refused).toMatch(/frozen scored record/);
    expect(out.undone).toContain('20261204160000_scored_record.ts');
    expect(out.columnGone).toBe(true);
    // Up again on rows without a record: backfilled again.
    expect(out.againSource).toBe('backfill');
  });
});
