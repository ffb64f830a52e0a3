/**
 * The scored record: at submit, one jsonb document freezes what was judged — the gate, its
 * site, the client (with the contact the signing link goes to), the organisation's and the
 * auditor's names, the ruleset's identity, the answers, measurements and observations, and the
 * result with its SHA-256. Reports, signing and the assessment page render from it alone, so a
 * later edit of the gate, site or client belongs to the next assessment only.
 *
 * The database builds the record itself, in the same statement that moves a row out of
 * `draft` (a BEFORE trigger calls `assessment_scored_record`), from the rows the submitting
 * transaction holds locked; no code path can leave a scored row without one. Once written,
 * the record never changes and the row never goes back to draft. A row inserted already out
 * of draft (a backup being restored) keeps the record it brings, or gets one built if it has
 * none.
 *
 * Backfill of rows submitted before this migration: their record is built by the same
 * function, from what each row has — its answers, measurements, observations, result and
 * result hash as stored, and the gate as scored where the row kept a `gate_snapshot` (its
 * fields, and its site's and client's, win over the live rows). What no snapshot kept (the
 * second address line, region, postal code, country, the client's contact) is taken from the
 * live rows as they stand at migration time, the best evidence left; such records say
 * `"source": "backfill"` so nobody mistakes them for a record frozen at submit. The
 * signed-assessment guard is switched off for the backfill statement only (it adds a column
 * value to rows that had none and changes nothing else).
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assessments', (t) => {
    /** Everything the report shows about what was judged, frozen at submit (see above). */
    t.jsonb('scored_record');
  });

  await knex.raw(`
    create function assessment_scored_record(a assessments, source text) returns jsonb
    language sql stable as $$
      select jsonb_build_object(
        'format', 1,
        'source', source,
        'frozenAt', now(),
        'purpose', a.purpose,
        'visitedOn', a.visited_on,
        'submittedAt', coalesce(a.submitted_at, now()),
        'organisation', jsonb_build_object('id', o.id, 'name', o.name),
        'auditor', jsonb_build_object('id', u.id, 'name', u.name, 'email', u.email),
        'gate', jsonb_build_object(
            'id', g.id, 'siteId', g.site_id, 'clientId', s.client_id, 'label', g.label, 'kind', g.kind,
            'leaves', g.leaves, 'openingDirection', g.opening_direction, 'widthMm', g.width_mm,
            'heightMm', g.height_mm, 'weightKg', g.weight_kg, 'entered', g.entered, 'operator', g.operator,
            'installedOn', g.installed_on::text
          ) || coalesce(
            (select jsonb_object_agg(key, value) from jsonb_each(a.gate_snapshot)
              where key in ('label', 'kind', 'leaves', 'openingDirection', 'widthMm', 'heightMm', 'weightKg',
                            'entered', 'operator', 'installedOn', 'siteId')),
            '{}'::jsonb),
        'site', jsonb_build_object(
            'id', s.id, 'name', s.name, 'addressLine1', s.address_line1, 'addressLine2', s.address_line2,
            'city', s.city, 'region', s.region, 'postalCode', s.postal_code, 'country', s.country,
            'usageClass', s.usage_class
          ) || coalesce(jsonb_strip_nulls(a.gate_snapshot -> 'site'), '{}'::jsonb),
        'client', jsonb_build_object(
            'id', c.id, 'name', c.name, 'kind', c.kind, 'contactEmail', c.contact_email, 'phone', c.phone
          ) || coalesce(jsonb_strip_nulls(a.gate_snapshot -> 'client') - 'contactEmail', '{}'::jsonb),
        'ruleset', jsonb_build_object(
            'versionId', rv.id, 'family', r.family, 'version', rv.version, 'title', r.title,
            'contentSha256', rv.content_sha256, 'areas', coalesce(rv.content -> 'areas', '[]'::jsonb)
          ),
        'answers', coalesce(a.answers, '{}'::jsonb),
        'measurements', coalesce(a.measurements, '{}'::jsonb),
        'observations', coalesce(a.observations, '{}'::jsonb),
        'result', a.result,
        'resultSha256', a.result_sha256
      )
      from gates g
      join sites s on s.id = coalesce((a.gate_snapshot ->> 'siteId')::uuid, g.site_id)
      join clients c on c.id = s.client_id
      join organisations o on o.id = a.organisation_id
      join users u on u.id = a.auditor_id
      join ruleset_versions rv on rv.id = a.ruleset_version_id
      join rulesets r on r.id = rv.ruleset_id
      where g.id = a.gate_id
    $$;
  `);

  // Backfill (see the header): rows already out of draft and without a record.
  await knex.raw('alter table assessments disable trigger assessments_signed_guard');
  await knex.raw(
    `update assessments a set scored_record = assessment_scored_record(a, 'backfill')
      where a.status <> 'draft' and a.scored_record is null`,
  );
  await knex.raw('alter table assessments enable trigger assessments_signed_guard');

  // Freezes the record as a row leaves draft; refuses any later change to it, and refuses a
  // row with a record going back to draft.
  await knex.raw(`
    create function assessments_scored_record_guard() returns trigger language plpgsql as $$
    begin
      if tg_op = 'UPDATE' and old.scored_record is not null then
        if new.scored_record is distinct from old.scored_record then
          raise exception 'assessment % has a frozen scored record that cannot change', old.id using errcode = 'P0001';
        end if;
        if new.status = 'draft' then
          raise exception 'assessment % was submitted and cannot go back to draft; start a new assessment', old.id
            using errcode = 'P0001';
        end if;
        return new;
      end if;
      if new.status = 'draft' then
        if new.scored_record is not null then
          raise exception 'a draft has no scored record' using errcode = 'P0001';
        end if;
        return new;
      end if;
      if tg_op = 'INSERT' then
        -- A row inserted already out of draft is a restore or a copy: it keeps the record it
        -- brings (a restore must not re-freeze from the rows as they are at restore time).
        if new.scored_record is null then
          new.scored_record := assessment_scored_record(new, 'submit');
        end if;
      else
        if new.result is null or new.result_sha256 is null then
          raise exception 'assessment % cannot leave draft without a stored result', new.id using errcode = 'P0001';
        end if;
        -- Always built here, never taken from the statement: the record is what the rows say now.
        new.scored_record := assessment_scored_record(new, 'submit');
        if new.scored_record is null then
          raise exception 'assessment % has no gate, site, client or ruleset to freeze', new.id using errcode = 'P0001';
        end if;
      end if;
      if new.gate_snapshot is null and new.scored_record is not null then
        new.gate_snapshot := (new.scored_record -> 'gate')
          || jsonb_build_object('site', new.scored_record -> 'site', 'client', new.scored_record -> 'client');
      end if;
      return new;
    end $$;
    create trigger assessments_scored_record_guard before insert or update on assessments
      for each row execute function assessments_scored_record_guard();
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop trigger if exists assessments_scored_record_guard on assessments');
  await knex.raw('drop function if exists assessments_scored_record_guard()');
  await knex.raw('drop function if exists assessment_scored_record(assessments, text)');
  await knex.raw('alter table assessments disable trigger assessments_signed_guard');
  await knex.schema.alterTable('assessments', (t) => {
    t.dropColumn('scored_record');
  });
  await knex.raw('alter table assessments enable trigger assessments_signed_guard');
}
