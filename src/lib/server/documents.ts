/**
 * Documents of the archive: PDFs stored content-addressed in file storage, each with a row
 * (kind, SHA-256, size) that a trigger keeps unchangeable. Reading is organisation-scoped;
 * a homeowner reads only documents of their own client's assessments.
 */
import type { Knex } from 'knex';
import { joinAssessmentOfClient } from './assessments';
import { db } from './db';
import type { SessionUser } from './session-user';
import { storage } from './storage';

export type DocumentKind = 'signing_copy' | 'signed_report';

export interface DocumentRecord {
  id: string;
  assessmentId: string;
  kind: DocumentKind;
  sha256: string;
  sizeBytes: number;
  contentType: string;
  filename: string;
  createdAt: string;
}

interface DocumentRow {
  id: string;
  assessment_id: string;
  kind: DocumentKind;
  sha256: string;
  size_bytes: number;
  content_type: string;
  filename: string;
  created_at: Date;
}

const columns = [
  'd.id',
  'd.assessment_id',
  'd.kind',
  'd.sha256',
  'd.size_bytes',
  'd.content_type',
  'd.filename',
  'd.created_at',
];

function toRecord(row: DocumentRow): DocumentRecord {
  return {
    id: row.id,
    assessmentId: row.assessment_id,
    kind: row.kind,
    sha256: row.sha256,
    sizeBytes: row.size_bytes,
    contentType: row.content_type,
    filename: row.filename,
    createdAt: new Date(row.created_at).toISOString(),
  };
}

/** Puts the bytes in file storage and records them; `id` may be chosen beforehand (it is printed in the PDF). */
export async function storeDocument(
  trx: Knex.Transaction,
  input: {
    id: string;
    organisationId: string;
    assessmentId: string;
    kind: DocumentKind;
    bytes: Buffer;
    filename: string;
    createdBy: string | null;
  },
): Promise<DocumentRecord> {
  const stored = await storage().put(input.bytes, 'application/pdf');
  const [row] = await trx('documents')
    .insert({
      id: input.id,
      organisation_id: input.organisationId,
      assessment_id: input.assessmentId,
      kind: input.kind,
      sha256: stored.key,
      storage_key: stored.key,
      size_bytes: stored.size,
      content_type: 'application/pdf',
      filename: input.filename,
      created_by: input.createdBy,
    })
    .returning([
      'id',
      'assessment_id',
      'kind',
      'sha256',
      'size_bytes',
      'content_type',
      'filename',
      'created_at',
    ]);
  return toRecord(row);
}

function visibleDocuments(knex: Knex, viewer: SessionUser): Knex.QueryBuilder {
  const query = knex('documents as d').where('d.organisation_id', viewer.organisationId);
  return viewer.role === 'homeowner'
    ? joinAssessmentOfClient(query, 'd.assessment_id', viewer.clientId)
    : query;
}

export async function getDocument(
  viewer: SessionUser,
  id: string,
  knex: Knex = db(),
): Promise<DocumentRecord | null> {
  const row = await visibleDocuments(knex, viewer)
    .andWhere('d.id', id)
    .first<DocumentRow | undefined>(columns);
  return row ? toRecord(row) : null;
}

export async function documentsOfAssessment(
  knex: Knex,
  organisationId: string,
  assessmentId: string,
): Promise<DocumentRecord[]> {
  const rows = await knex('documents as d')
    .where({ 'd.organisation_id': organisationId, 'd.assessment_id': assessmentId })
    .orderBy('d.created_at')
    .select<DocumentRow[]>(columns);
  return rows.map(toRecord);
}

/** A document row by id, without an access check (callers have checked a link or a role). */
export async function documentById(knex: Knex, id: string): Promise<DocumentRecord | null> {
  const row = await knex('documents as d').where('d.id', id).first<DocumentRow | undefined>(columns);
  return row ? toRecord(row) : null;
}

/** The document row of one kind for an assessment (the newest), without an access check. */
export async function latestDocument(
  knex: Knex,
  assessmentId: string,
  kind: DocumentKind,
): Promise<DocumentRecord | null> {
  const row = await knex('documents as d')
    .where({ 'd.assessment_id': assessmentId, 'd.kind': kind })
    .orderBy('d.created_at', 'desc')
    .first<DocumentRow | undefined>(columns);
  return row ? toRecord(row) : null;
}

/** The stored bytes of a document, checked against its recorded SHA-256. */
export async function documentBytes(document: DocumentRecord): Promise<Buffer> {
  const bytes = await storage().get(document.sha256);
  if (!bytes) throw new Error(`document ${document.id} is missing from file storage`);
  return bytes;
}
