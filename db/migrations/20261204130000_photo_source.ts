/**
 * A photo as the camera made it, before the phone shrank it for a weak signal: its SHA-256 and
 * size (so a copy kept elsewhere can be matched to the report) and the EXIF orientation it
 * carried. The uploaded file (`original_*`) is what the server received; for a photo sent
 * unchanged the two are the same file.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assessment_photos', (t) => {
    t.text('source_sha256');
    t.bigInteger('source_bytes');
    t.smallint('source_orientation');
  });
  await knex.raw(
    `alter table assessment_photos add constraint assessment_photos_source_facts check (
       (source_sha256 is null or source_sha256 ~ '^[0-9a-f]{64}$')
       and (source_bytes is null or source_bytes > 0)
       and (source_orientation is null or source_orientation between 1 and 8))`,
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('alter table assessment_photos drop constraint if exists assessment_photos_source_facts');
  await knex.schema.alterTable('assessment_photos', (t) => {
    t.dropColumns('source_sha256', 'source_bytes', 'source_orientation');
  });
}
