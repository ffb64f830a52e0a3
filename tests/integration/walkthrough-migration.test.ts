/**
 * The walk-through's migration is reversible: on a database of its own, migrate to the latest
 * schema, step down until 20261202004000_walkthrough_media is undone (its columns and unique
 * indexes gone, the photo and trace tables kept), then up again.
 */
import { describe, expect, it } from 'vitest';
import { runTsx, useScratchDatabase } from './support/scratch-database';

const scratch = useScratchDatabase('latchwell_walk_migration');

/** Runs in a tsx child: knex loads .ts migrations with Node's own import(). */
const script = (url: string) => `
  const { default: knex } = await import('knex');
  const { knexConfig } = await import('./knexfile.ts');
  const k = knex(knexConfig(${JSON.stringify(url)}));
  const state = async () => ({
    columns: (await k.raw("select table_name || '.' || column_name as c from information_schema.columns where table_schema = current_schema() and table_name in ('assessment_photos', 'force_traces') and column_name in ('client_ref', 'thumb_bytes', 'original_filename', 'location', 'direction', 'gap_mm') order by 1")).rows.map((r) => r.c),
    indexes: (await k.raw("select indexname from pg_indexes where indexname in ('assessment_photos_client_ref', 'force_traces_client_ref') order by 1")).rows.map((r) => r.indexname),
  });
  try {
    await k.migrate.latest();
    const up = await state();
    const undone = [];
    for (;;) {
      const [, names] = await k.migrate.down();
      undone.push(...names);
      if (!names.length || names.some((n) => n.startsWith('20261202004000_'))) break;
    }
    const down = await state();
    await k.migrate.latest();
    const again = await state();
    console.log(JSON.stringify({ up, undone, down, again }));
  } finally {
    await k.destroy();
  }
`;

describe('walk-through migration', () => {
  it('goes down and up again cleanly', () => {
    const run = runTsx(script(scratch.url));
    expect(run.status, run.stderr).toBe(0);
    const result = JSON.parse(run.stdout.trim().split('\n').pop()!);
    expect(result.up).toEqual({
      columns: [
        'assessment_photos.client_ref',
        'assessment_photos.original_filename',
        'assessment_photos.thumb_bytes',
        'force_traces.client_ref',
        'force_traces.direction',
        'force_traces.gap_mm',
        'force_traces.location',
        'force_traces.original_filename',
      ],
      indexes: ['assessment_photos_client_ref', 'force_traces_client_ref'],
    });
    expect(result.undone).toContain('20261202004000_walkthrough_media.ts');
    expect(result.down).toEqual({ columns: [], indexes: [] });
    expect(result.again).toEqual(result.up);
  });
});
