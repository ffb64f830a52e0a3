/**
 * Discarding the draft revision of a signed assessment puts the original back: superseded ->
 * signed is allowed, with nothing else changed, only once no assessment names it in
 * supersedes_id any more (the draft is deleted first, in the same transaction).
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    create or replace function assessments_signed_guard() returns trigger language plpgsql as $$
    begin
      if old.status not in ('signed', 'superseded') then
        return case when tg_op = 'DELETE' then old else new end;
      end if;
      if tg_op = 'DELETE' then
        raise exception 'assessment % is % and cannot be deleted', old.id, old.status using errcode = 'P0001';
      end if;
      if old.status = 'signed' and new.status = 'superseded'
         and (to_jsonb(new) - 'status' - 'updated_at') = (to_jsonb(old) - 'status' - 'updated_at') then
        return new;
      end if;
      if old.status = 'superseded' and new.status = 'signed'
         and (to_jsonb(new) - 'status' - 'updated_at') = (to_jsonb(old) - 'status' - 'updated_at')
         and not exists (select 1 from assessments a where a.supersedes_id = old.id) then
        return new;
      end if;
      raise exception 'assessment % is % and read-only; start a revision to correct it', old.id, old.status using errcode = 'P0001';
    end $$;
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(`
    create or replace function assessments_signed_guard() returns trigger language plpgsql as $$
    begin
      if old.status not in ('signed', 'superseded') then
        return case when tg_op = 'DELETE' then old else new end;
      end if;
      if tg_op = 'DELETE' then
        raise exception 'assessment % is % and cannot be deleted', old.id, old.status using errcode = 'P0001';
      end if;
      if old.status = 'signed' and new.status = 'superseded'
         and (to_jsonb(new) - 'status' - 'updated_at') = (to_jsonb(old) - 'status' - 'updated_at') then
        return new;
      end if;
      raise exception 'assessment % is % and read-only; start a revision to correct it', old.id, old.status using errcode = 'P0001';
    end $$;
  `);
}
