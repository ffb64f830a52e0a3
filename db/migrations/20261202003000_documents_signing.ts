/**
 * Reports, signatures and the archive: content-addressed documents (the PDF shown for signing
 * and the final signed PDF), single-use signing links, the homeowner's signature record, the
 * photos and force traces a report shows, and database-level guards that keep a signed
 * assessment and every document row unchangeable.
 */
import type { Knex } from 'knex';

const sha256Check = (column: string) => `${column} ~ '^[0-9a-f]{64}$'`;

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('documents', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('assessment_id').notNullable().references('assessments.id').onDelete('restrict');
    /** `signing_copy`: the PDF rendered at send time and shown to the signer; `signed_report`: the final, digitally signed PDF. */
    t.text('kind').notNullable().checkIn(['signing_copy', 'signed_report']);
    t.text('sha256').notNullable();
    /** Key in file storage; content-addressed, so equal to sha256. */
    t.text('storage_key').notNullable();
    t.integer('size_bytes').notNullable().checkPositive();
    t.text('content_type').notNullable().defaultTo('application/pdf');
    t.text('filename').notNullable();
    t.uuid('created_by').references('users.id').onDelete('restrict');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['organisation_id', 'created_at']);
    t.index(['assessment_id']);
  });
  await knex.raw(
    `alter table documents add constraint documents_sha256_hex check (${sha256Check('sha256')} and storage_key = sha256)`,
  );
  // One final document per assessment: a correction is a new assessment (revision).
  await knex.raw(
    `create unique index documents_one_signed_report on documents (assessment_id) where kind = 'signed_report'`,
  );

  await knex.schema.createTable('sign_requests', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('assessment_id').notNullable().references('assessments.id').onDelete('restrict');
    /** SHA-256 of the link token; the token itself is only ever in the e-mail. */
    t.text('token_hash').notNullable().unique();
    t.specificType('recipient_email', 'citext').notNullable();
    t.text('recipient_name').notNullable();
    /** The signing copy this link shows; the signer's submit must carry its SHA-256. */
    t.uuid('document_id').notNullable().references('documents.id').onDelete('restrict');
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
    /** Set when a newer link replaces this one, or the assessment is revised. */
    t.timestamp('revoked_at', { useTz: true });
    t.uuid('created_by').notNullable().references('users.id').onDelete('restrict');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['assessment_id', 'created_at']);
  });
  await knex.raw(
    `alter table sign_requests add constraint sign_requests_token_hash_hex check (${sha256Check('token_hash')})`,
  );
  await knex.raw(
    `create unique index sign_requests_one_open on sign_requests (assessment_id) where used_at is null and revoked_at is null`,
  );

  await knex.schema.createTable('signatures', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    /** Unique: an assessment is acknowledged once; a double submit cannot sign twice. */
    t.uuid('assessment_id').notNullable().unique().references('assessments.id').onDelete('restrict');
    t.uuid('sign_request_id').notNullable().unique().references('sign_requests.id').onDelete('restrict');
    t.text('signer_name').notNullable();
    t.specificType('signer_email', 'citext').notNullable();
    /** The consent sentence exactly as shown, and the signer's yes. */
    t.text('consent_text').notNullable();
    t.boolean('consented').notNullable();
    /** The statement of intent exactly as shown next to the sign button. */
    t.text('intent_text').notNullable();
    /** `drawn`: a signature drawn on the pad; `typed`: the typed name is the mark (no pointer available). */
    t.text('signature_method').notNullable().checkIn(['drawn', 'typed']);
    /** Storage key (SHA-256) of the drawn signature PNG; null for a typed mark. */
    t.text('signature_image_key');
    /** [{ ruleId, title, caution }] each ticked by the signer. */
    t.jsonb('cautions_acknowledged').notNullable().defaultTo('[]');
    /** SHA-256 of the signing copy the signer was shown (and their submit named). */
    t.text('shown_pdf_sha256').notNullable();
    t.specificType('ip', 'inet');
    t.text('user_agent');
    t.timestamp('signed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`alter table signatures add constraint signatures_consented check (consented)`);
  await knex.raw(
    `alter table signatures add constraint signatures_hashes_hex check (${sha256Check('shown_pdf_sha256')} and (signature_image_key is null or ${sha256Check('signature_image_key')}))`,
  );
  await knex.raw(
    `alter table signatures add constraint signatures_drawn_has_image check ((signature_method = 'drawn') = (signature_image_key is not null))`,
  );

  await knex.schema.createTable('assessment_photos', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('assessment_id').notNullable().references('assessments.id').onDelete('restrict');
    /** The walk-through item (question key) or rule id the photo documents. */
    t.text('item_key').notNullable();
    t.text('caption');
    /** The file as uploaded. */
    t.text('original_sha256').notNullable();
    t.text('original_content_type').notNullable();
    t.integer('original_bytes').notNullable();
    /** Display size (EXIF orientation applied), used in the report. */
    t.text('display_sha256').notNullable();
    t.text('display_content_type').notNullable().defaultTo('image/jpeg');
    t.integer('display_bytes').notNullable();
    t.integer('width').notNullable();
    t.integer('height').notNullable();
    t.text('thumb_sha256');
    t.timestamp('taken_at', { useTz: true });
    t.uuid('uploaded_by').references('users.id').onDelete('restrict');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['assessment_id', 'item_key']);
  });
  await knex.raw(
    `alter table assessment_photos add constraint assessment_photos_hashes_hex check (${sha256Check('original_sha256')} and ${sha256Check('display_sha256')} and (thumb_sha256 is null or ${sha256Check('thumb_sha256')}))`,
  );

  await knex.schema.createTable('force_traces', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('organisation_id').notNullable().references('organisations.id').onDelete('restrict');
    t.uuid('assessment_id').notNullable().references('assessments.id').onDelete('restrict');
    /** Measuring point, e.g. `closingEdge300` (the walk-through item it belongs to). */
    t.text('item_key').notNullable();
    t.text('label');
    /** The CSV as uploaded, in file storage. */
    t.text('csv_sha256');
    /** [[t_s, f_N], …] as parsed (possibly thinned for plotting). */
    t.jsonb('samples').notNullable();
    /** The force-trace calculator's judgement (peak, durations, limits, pass/fail) as stored at upload. */
    t.jsonb('evaluation');
    t.uuid('uploaded_by').references('users.id').onDelete('restrict');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['assessment_id', 'item_key']);
  });

  // Document rows and signature records are the archive: written once, never changed or removed.
  await knex.raw(`
    create function archive_rows_immutable() returns trigger language plpgsql as $$
    begin
      raise exception '% rows are part of the signed archive and cannot be changed (%)', tg_table_name, tg_op using errcode = 'P0001';
    end $$;
    create trigger documents_immutable before update or delete on documents
      for each row execute function archive_rows_immutable();
    create trigger signatures_immutable before update or delete on signatures
      for each row execute function archive_rows_immutable();
  `);

  // A link's identity never changes; only its use or revocation is recorded, once.
  await knex.raw(`
    create function sign_requests_guard() returns trigger language plpgsql as $$
    begin
      if tg_op = 'DELETE' then
        raise exception 'signing links are kept as a record and cannot be deleted' using errcode = 'P0001';
      end if;
      if (to_jsonb(new) - 'used_at' - 'revoked_at') is distinct from (to_jsonb(old) - 'used_at' - 'revoked_at')
         or (old.used_at is not null and new.used_at is distinct from old.used_at)
         or (old.revoked_at is not null and new.revoked_at is distinct from old.revoked_at) then
        raise exception 'a signing link can only be marked used or revoked, once' using errcode = 'P0001';
      end if;
      return new;
    end $$;
    create trigger sign_requests_guard before update or delete on sign_requests
      for each row execute function sign_requests_guard();
  `);

  // A signed assessment is read-only: the one change allowed is signed -> superseded when a
  // revision replaces it; a superseded one never changes again. Neither can be deleted.
  await knex.raw(`
    create function assessments_signed_guard() returns trigger language plpgsql as $$
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
    create trigger assessments_signed_guard before update or delete on assessments
      for each row execute function assessments_signed_guard();
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop trigger if exists assessments_signed_guard on assessments');
  await knex.raw('drop function if exists assessments_signed_guard');
  await knex.schema.dropTableIfExists('force_traces');
  await knex.schema.dropTableIfExists('assessment_photos');
  await knex.schema.dropTableIfExists('signatures');
  await knex.schema.dropTableIfExists('sign_requests');
  await knex.raw('drop function if exists sign_requests_guard cascade');
  await knex.schema.dropTableIfExists('documents');
  await knex.raw('drop function if exists archive_rows_immutable cascade');
}
