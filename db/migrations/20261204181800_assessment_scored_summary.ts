/**
 * What the assessment list shows of a submitted assessment's frozen record — the gate's label and
 * kind, the site, the client and the ruleset's title — kept beside the record as one small flat
 * jsonb, `scored_summary`. The record itself carries the result and the documents (tens of
 * kilobytes, stored compressed out of line), and every value read from it decompressed the
 * whole record again: ten values a row made the list page cost ten times the record's size.
 *
 * The database derives the summary: a BEFORE trigger sets it from `scored_record` on every
 * insert or update that could touch either (whatever a statement supplies is overwritten), so it
 * can never disagree with the record. The trigger is named to fire after
 * `assessments_scored_record_guard` (which builds the record at submit) and before
 * `assessments_signed_guard` (which compares a signed row's old and new values): PostgreSQL
 * fires the BEFORE triggers of a row in name order. A draft has neither and the trigger does not
 * run for it (its WHEN clause), so an autosave pays nothing for it.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('assessments', (t) => {
    /** The list's frozen values, derived from scored_record by the trigger below (see above). */
    t.jsonb('scored_summary');
  });
  // jsonb_build_object is marked stable only because it formats arbitrary types; with jsonb
  // arguments its result depends on them alone.
  await knex.raw(`
    create function assessment_scored_summary(record jsonb) returns jsonb
    language sql immutable strict parallel safe as $$
      select jsonb_build_object(
        'gateLabel', record #> '{gate,label}',
        'gateKind', record #> '{gate,kind}',
        'siteId', record #> '{site,id}',
        'siteName', record #> '{site,name}',
        'siteAddressLine1', record #> '{site,addressLine1}',
        'siteCity', record #> '{site,city}',
        'siteUsageClass', record #> '{site,usageClass}',
        'clientId', record #> '{client,id}',
        'clientName', record #> '{client,name}',
        'rulesetTitle', record #> '{ruleset,title}'
      )
    $$;

    create function assessments_scored_summary() returns trigger language plpgsql as $$
    begin
      new.scored_summary := assessment_scored_summary(new.scored_record);
      return new;
    end $$;
    create trigger assessments_scored_summary before insert or update on assessments
      for each row when (new.scored_record is not null or new.scored_summary is not null)
      execute function assessments_scored_summary();
  `);

  // Rows already submitted. The signed-assessment guard refuses any change to a signed row, so
  // it is off for this one statement, which fills the new column and changes nothing else.
  await knex.raw('alter table assessments disable trigger assessments_signed_guard');
  await knex.raw(
    'update assessments set scored_summary = assessment_scored_summary(scored_record) where scored_record is not null',
  );
  await knex.raw('alter table assessments enable trigger assessments_signed_guard');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop trigger if exists assessments_scored_summary on assessments');
  await knex.raw('drop function if exists assessments_scored_summary()');
  await knex.schema.alterTable('assessments', (t) => {
    t.dropColumn('scored_summary');
  });
  await knex.raw('drop function if exists assessment_scored_summary(jsonb)');
}
