/**
 * The domain API's additions to the core schema: what was entered for each gate dimension,
 * plausibility checks, indexes for the lists' search and sort, and a trigger that keeps a
 * scored assessment's record fixed and refuses deleting anything but a draft.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('gates', (t) => {
    /** What was measured, as entered: { width?: { value, unit }, height?: …, weight?: … }. */
    t.jsonb('entered').notNullable().defaultTo('{}');
  });
  await knex.raw(`
    alter table gates
      add constraint gates_width_positive check (width_mm is null or width_mm > 0),
      add constraint gates_height_positive check (height_mm is null or height_mm > 0),
      add constraint gates_weight_positive check (weight_kg is null or weight_kg > 0)
  `);

  await knex.raw('create index clients_name_trgm on clients using gin (name gin_trgm_ops)');
  await knex.raw('create index sites_address_trgm on sites using gin (address_line1 gin_trgm_ops)');
  await knex.raw('create index gates_organisation_kind on gates (organisation_id, kind)');
  await knex.raw(
    'create index assessments_organisation_created on assessments (organisation_id, created_at, id)',
  );
  await knex.raw(
    'create index assessments_organisation_verdict on assessments (organisation_id, verdict) where verdict is not null',
  );

  // Once scored, an assessment is a record: what was found and what it scored stay as they
  // were while it goes through the signing flow (it may only go back to draft as a whole).
  // Only drafts may be deleted. (Signed and superseded rows are guarded as read-only by the
  // signing migration's own trigger.)
  await knex.raw(`
    create function assessments_record_guard() returns trigger language plpgsql as $$
    declare
      record_columns constant text[] := array['organisation_id', 'gate_id', 'ruleset_version_id', 'auditor_id', 'answers',
        'measurements', 'observations', 'gate_snapshot', 'result', 'result_sha256', 'verdict', 'submitted_at'];
    begin
      if tg_op = 'DELETE' then
        if old.status <> 'draft' then
          raise exception 'assessment % is % and cannot be deleted', old.id, old.status using errcode = 'P0001';
        end if;
        return old;
      end if;
      if old.status in ('scored', 'awaiting_signature') and new.status <> 'draft'
         and exists (select 1 from unnest(record_columns) c where to_jsonb(new) -> c is distinct from to_jsonb(old) -> c) then
        raise exception 'assessment % is % and its scored record cannot change', old.id, old.status using errcode = 'P0001';
      end if;
      return new;
    end $$;
    create trigger assessments_record_guard before update or delete on assessments
      for each row execute function assessments_record_guard();
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop trigger if exists assessments_record_guard on assessments');
  await knex.raw('drop function if exists assessments_record_guard()');
  await knex.raw('drop index if exists assessments_organisation_verdict');
  await knex.raw('drop index if exists assessments_organisation_created');
  await knex.raw('drop index if exists gates_organisation_kind');
  await knex.raw('drop index if exists sites_address_trgm');
  await knex.raw('drop index if exists clients_name_trgm');
  await knex.raw(
    'alter table gates drop constraint if exists gates_width_positive, drop constraint if exists gates_height_positive, drop constraint if exists gates_weight_positive',
  );
  await knex.schema.alterTable('gates', (t) => {
    t.dropColumn('entered');
  });
}
