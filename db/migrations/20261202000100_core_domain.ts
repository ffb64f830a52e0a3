/**
 * Core domain: organisations and their people, clients, sites, gates, rulesets and their
 * immutable published versions, assessments, the append-only audit trail and the mail outbox.
 * Every business row carries organisation_id.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('create extension if not exists citext');
  await knex.raw('create extension if not exists pg_trgm');

  await knex.schema.createTable('organisations', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('name').notNullable();
    t.text('slug').notNullable().unique();
    t.text('display_units').notNullable().defaultTo('imperial').checkIn(['imperial', 'metric']);
    t.text('time_zone').notNullable().defaultTo('UTC');
    t.integer('reinspection_months').notNullable().defaultTo(12).checkBetween([1, 60]);
    t.boolean('remind_clients').notNullable().defaultTo(false);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('clients', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.text('name').notNullable();
    t.text('kind').notNullable().checkIn(['homeowner', 'property_manager', 'business']);
    t.specificType('contact_email', 'citext');
    t.text('phone');
    t.text('notes');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'name']);
  });

  await knex.schema.createTable('users', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.specificType('email', 'citext').notNullable().unique();
    t.text('name').notNullable();
    t.text('role').notNullable().checkIn(['owner', 'office', 'auditor', 'homeowner']);
    t.text('password_hash');
    /** The client a homeowner / property manager belongs to; null for staff. */
    t.uuid('client_id').references('clients.id').onDelete('restrict');
    t.boolean('active').notNullable().defaultTo(true);
    /** Bumped on deactivation or role change so existing sessions stop working. */
    t.integer('session_version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'role']);
  });
  await knex.raw(
    `alter table users add constraint users_homeowner_has_client check ((role = 'homeowner') = (client_id is not null))`,
  );

  await knex.schema.createTable('sites', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('client_id').notNullable().references('clients.id').onDelete('restrict');
    t.text('name');
    t.text('address_line1').notNullable();
    t.text('address_line2');
    t.text('city').notNullable();
    t.text('region');
    t.text('postal_code');
    t.text('country').notNullable().defaultTo('US');
    t.smallint('usage_class').notNullable().checkBetween([1, 4]);
    t.text('notes');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'client_id']);
  });

  await knex.schema.createTable('gates', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('site_id').notNullable().references('sites.id').onDelete('restrict');
    t.text('label').notNullable();
    t.text('kind')
      .notNullable()
      .checkIn(['swing', 'slide', 'barrier_arm', 'vertical_lift', 'vertical_pivot', 'overhead_pivot']);
    t.text('leaves').notNullable().defaultTo('single').checkIn(['single', 'double']);
    t.text('opening_direction').checkIn(['pull_to_open', 'push_to_open']);
    t.integer('width_mm');
    t.integer('height_mm');
    t.integer('weight_kg');
    /** Operator facts: { listed, manufacturedOn, mounting, power, model note } as entered. */
    t.jsonb('operator').notNullable().defaultTo('{}');
    t.date('installed_on');
    t.date('next_inspection_due');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'site_id']);
    t.index(['organisation_id', 'next_inspection_due']);
  });

  await knex.schema.createTable('rulesets', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    /** Null for the families shipped in rulesets/; set for an organisation's local family. */
    t.uuid('organisation_id').references('organisations.id').onDelete('restrict');
    t.text('family').notNullable();
    t.text('title').notNullable();
    t.text('region');
    /** For a local family: the shipped family it amends. */
    t.text('based_on_family');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(
    `create unique index rulesets_family_unique on rulesets (coalesce(organisation_id, '00000000-0000-0000-0000-000000000000'::uuid), family)`,
  );

  await knex.schema.createTable('ruleset_versions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('ruleset_id').notNullable().references('rulesets.id').onDelete('restrict');
    t.text('version').notNullable();
    t.jsonb('content').notNullable();
    t.text('content_sha256').notNullable();
    t.text('status').notNullable().defaultTo('draft').checkIn(['draft', 'published', 'retired']);
    t.uuid('derived_from_version_id').references('ruleset_versions.id');
    t.uuid('created_by');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('published_at', { useTz: true });
    t.unique(['ruleset_id', 'version']);
  });
  // A published version is a record of what was applied: its content never changes and it is
  // never deleted. The only change allowed is published -> retired.
  await knex.raw(`
    create function ruleset_versions_guard() returns trigger language plpgsql as $$
    begin
      if tg_op = 'DELETE' then
        if old.status <> 'draft' then
          raise exception 'ruleset version % is % and cannot be deleted', old.version, old.status using errcode = 'P0001';
        end if;
        return old;
      end if;
      if old.status <> 'draft' then
        if new.content is distinct from old.content or new.content_sha256 is distinct from old.content_sha256
           or new.version is distinct from old.version or new.ruleset_id is distinct from old.ruleset_id
           or new.published_at is distinct from old.published_at then
          raise exception 'ruleset version % is % and its content cannot change', old.version, old.status using errcode = 'P0001';
        end if;
        if not (new.status = old.status or (old.status = 'published' and new.status = 'retired')) then
          raise exception 'ruleset version % cannot go from % to %', old.version, old.status, new.status using errcode = 'P0001';
        end if;
      end if;
      return new;
    end $$;
    create trigger ruleset_versions_guard before update or delete on ruleset_versions
      for each row execute function ruleset_versions_guard();
  `);

  await knex.schema.createTable('assessments', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('gate_id').notNullable().references('gates.id').onDelete('restrict');
    t.uuid('ruleset_version_id').notNullable().references('ruleset_versions.id').onDelete('restrict');
    t.uuid('auditor_id').notNullable().references('users.id').onDelete('restrict');
    t.text('status')
      .notNullable()
      .defaultTo('draft')
      .checkIn(['draft', 'scored', 'awaiting_signature', 'signed', 'superseded']);
    t.text('purpose').notNullable().defaultTo('inspection').checkIn(['handover', 'service', 'inspection']);
    t.jsonb('answers').notNullable().defaultTo('{}');
    t.jsonb('measurements').notNullable().defaultTo('{}');
    /** Everything else the walk-through records: site context, sensing devices, force tests, geometry, HRN overrides. */
    t.jsonb('observations').notNullable().defaultTo('{}');
    /** The gate profile as it was scored (the gate row may change later). */
    t.jsonb('gate_snapshot');
    t.jsonb('result');
    t.text('result_sha256');
    t.text('verdict').checkIn(['clear', 'remedy', 'withdraw']);
    t.integer('row_version').notNullable().defaultTo(1);
    t.uuid('supersedes_id').references('assessments.id');
    t.timestamp('visited_on', { useTz: true });
    t.timestamp('submitted_at', { useTz: true });
    t.timestamp('signed_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'status']);
    t.index(['organisation_id', 'gate_id', 'created_at']);
    t.index(['organisation_id', 'auditor_id', 'updated_at']);
  });

  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id').primary();
    t.uuid('organisation_id').references('organisations.id');
    t.uuid('actor_user_id');
    t.text('actor_label');
    t.text('action').notNullable();
    t.text('entity_type');
    t.text('entity_id');
    t.specificType('ip', 'inet');
    t.jsonb('detail').notNullable().defaultTo('{}');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('prev_hash').notNullable();
    t.text('hash').notNullable().unique();
    t.index(['organisation_id', 'created_at']);
    t.index(['entity_type', 'entity_id']);
  });
  await knex.raw(`
    create function audit_events_append_only() returns trigger language plpgsql as $$
    begin
      raise exception 'audit events are append-only' using errcode = 'P0001';
    end $$;
    create trigger audit_events_append_only before update or delete on audit_events
      for each row execute function audit_events_append_only();
  `);

  await knex.schema.createTable('outbox_messages', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').references('organisations.id');
    t.text('kind').notNullable();
    t.specificType('to_addresses', 'text[]').notNullable();
    t.specificType('cc_addresses', 'text[]').notNullable().defaultTo('{}');
    t.text('subject').notNullable();
    t.text('text_body').notNullable();
    t.text('html_body');
    /** [{ filename, contentType, storageKey (sha256) }] */
    t.jsonb('attachments').notNullable().defaultTo('[]');
    t.text('status').notNullable().defaultTo('queued').checkIn(['queued', 'sending', 'sent', 'failed']);
    t.integer('attempts').notNullable().defaultTo(0);
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('last_error');
    t.text('related_type');
    t.text('related_id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('sent_at', { useTz: true });
    t.index(['status', 'next_attempt_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('outbox_messages');
  await knex.schema.dropTableIfExists('audit_events');
  await knex.raw('drop function if exists audit_events_append_only cascade');
  await knex.schema.dropTableIfExists('assessments');
  await knex.schema.dropTableIfExists('ruleset_versions');
  await knex.raw('drop function if exists ruleset_versions_guard cascade');
  await knex.schema.dropTableIfExists('rulesets');
  await knex.schema.dropTableIfExists('gates');
  await knex.schema.dropTableIfExists('sites');
  await knex.schema.dropTableIfExists('users');
  await knex.schema.dropTableIfExists('clients');
  await knex.schema.dropTableIfExists('organisations');
}
