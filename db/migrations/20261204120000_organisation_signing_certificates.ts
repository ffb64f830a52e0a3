/**
 * The certificate an owner uploads to sign the organisation's reports in place of the
 * self-made one: the key and chain re-wrapped as PKCS#12 under a random passphrase, that
 * passphrase sealed with a key derived from AUTH_SECRET (never in plain text), and the facts
 * shown on the settings page. One per organisation; replacing or removing it is audited.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('organisation_signing_certificates', (t) => {
    t.uuid('organisation_id').primary().references('organisations.id').onDelete('cascade');
    t.binary('p12').notNullable();
    /** `v1.<salt>.<iv>.<tag>.<ciphertext>`, AES-256-GCM; see src/lib/server/signing-certificates.ts. */
    t.text('passphrase_sealed').notNullable();
    t.text('sha256').notNullable();
    t.text('subject').notNullable();
    t.text('issuer').notNullable();
    t.boolean('self_signed').notNullable();
    t.timestamp('not_before', { useTz: true }).notNullable();
    t.timestamp('not_after', { useTz: true }).notNullable();
    t.uuid('uploaded_by').references('users.id').onDelete('set null');
    t.text('uploaded_by_label');
    t.timestamp('uploaded_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(
    `alter table organisation_signing_certificates add constraint organisation_signing_certificates_sha256_hex check (sha256 ~ '^[0-9a-f]{64}$')`,
  );
  await knex.raw(
    `alter table organisation_signing_certificates add constraint organisation_signing_certificates_size check (octet_length(p12) <= 262144)`,
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('organisation_signing_certificates');
}
