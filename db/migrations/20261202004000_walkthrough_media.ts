/**
 * What the walk-through adds to the photo and force-trace tables of the signed-assessment
 * migration: the device's own id for each upload (so an upload retried after a dropped
 * connection is stored once), the thumbnail's size, and the measuring point of a force trace
 * (where on the gate, which direction of travel, the gap left) that its limits depend on.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assessment_photos', (t) => {
    /** Chosen by the device when the photo is taken; the same upload sent twice is one photo. */
    t.uuid('client_ref');
    t.integer('thumb_bytes');
    t.text('original_filename');
  });
  await knex.raw(
    'create unique index assessment_photos_client_ref on assessment_photos (assessment_id, client_ref) where client_ref is not null',
  );

  await knex.schema.alterTable('force_traces', (t) => {
    t.uuid('client_ref');
    t.text('location').checkIn(['closing_edge', 'opening_edge', 'hinge_side', 'post_gap', 'other']);
    t.text('direction').checkIn(['closing', 'opening']);
    /** Gap left at the measuring point, mm: picks the EN 12453 limit. */
    t.double('gap_mm');
    t.text('original_filename');
  });
  await knex.raw(
    'create unique index force_traces_client_ref on force_traces (assessment_id, client_ref) where client_ref is not null',
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop index if exists force_traces_client_ref');
  await knex.schema.alterTable('force_traces', (t) => {
    t.dropColumns('client_ref', 'location', 'direction', 'gap_mm', 'original_filename');
  });
  await knex.raw('drop index if exists assessment_photos_client_ref');
  await knex.schema.alterTable('assessment_photos', (t) => {
    t.dropColumns('client_ref', 'thumb_bytes', 'original_filename');
  });
}
