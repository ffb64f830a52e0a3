/**
 * The documents/signing migrations are reversible: on a database of its own, migrate to the
 * latest schema, step down until 20261202003000_documents_signing is undone (its tables,
 * functions and the signed-assessment guard gone, the outbox channel column gone), then up again.
 */
import { describe, expect, it } from 'vitest';
import { runTsx, useScratchDatabase } from './support/scratch-database';

const scratch = useScratchDatabase('latchwell_migration');

/** Runs in a tsx child: knex loads .ts migrations with Node's own import(). */
const script = (url: string) => `
  const { default: knex } = await import('knex');
  const { knexConfig } = await import('./knexfile.ts');
  const k = knex(knexConfig(${JSON.stringify(url)}));
  const state = async () => ({
    tables: (await k.raw("select table_name from information_schema.tables where table_schema = current_schema() and table_name in ('documents', 'sign_requests', 'signatures', 'assessment_photos', 'force_traces') order by 1")).rows.map((r) => r.table_name),
    functions: (await k.raw("select proname from pg_proc where proname in ('archive_rows_immutable', 'sign_requests_guard', 'assessments_signed_guard') order by 1")).rows.map((r) => r.proname),
    channel: (await k.raw("select count(*)::int as n from information_schema.columns where table_name = 'outbox_messages' and column_name = 'channel'")).rows[0].n,
  });
  try {
    await k.migrate.latest();
    const up = await state();
    const undone = [];
    for (;;) {
      const [, names] = await k.migrate.down();
      undone.push(...names);
      if (!names.length || names.some((n) => n.startsWith('20261202003000_'))) break;
    }
    const down = await state();
    await k.migrate.latest();
    const again = await state();
    console.log(JSON.stringify({ up, undone, down, again }));
  } finally {
    await k.destroy();
  }
`;

describe('documents and signing migrations', () => {
  it('go down and up again cleanly', () => {
    const run = runTsx(script(scratch.url));
    expect(run.status, run.stderr).toBe(0);
    const result = JSON.parse(run.stdout.trim().split('\n').pop()!);
    const all = ['assessment_photos', 'documents', 'force_traces', 'sign_requests', 'signatures'];
    const guards = ['archive_rows_immutable', 'assessments_signed_guard', 'sign_requests_guard'];
    expect(result.up).toEqual({ tables: all, functions: guards, channel: 1 });
    expect(result.undone).toContain('20261202003000_documents_signing.ts');
    expect(result.undone).toContain('20261202003100_documents_outbox_channel.ts');
    expect(result.down).toEqual({ tables: [], functions: [], channel: 0 });
    expect(result.again).toEqual(result.up);
  });
});
