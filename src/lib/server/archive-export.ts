/**
 * The archive export: a ZIP of the signed PDFs the current filter matches, with `index.csv`
 * describing each, streamed while it is built.
 *
 * Memory stays flat however many documents match: rows are read in keyset batches (never one
 * big array), the index is generated as the ZIP writer asks for it, and PDFs are added one at a
 * time — the next file is opened only when the previous entry is finished, and the ZIP writer
 * stops reading when the download is slower than the disk (stream back-pressure). Everything
 * signed up to the moment the export starts is included, so the index and the files agree
 * even while new reports are being signed.
 */
import { once } from 'node:events';
import { Readable } from 'node:stream';
import { ZipArchive } from 'archiver';
import type { Knex } from 'knex';
import type { ArchiveFilter } from '@/lib/api/archive';
import { applyArchiveFilter, archiveBase, archiveDateSql, archiveLookups } from './archive-filters';
import { csvRow } from './csv';
import { db } from './db';
import { iso } from './listing';
import { storage } from './storage';

interface ExportRow {
  assessment_id: string;
  archive_date: Date;
  signed_at: Date | null;
  status: string;
  verdict: string | null;
  client_name: string;
  address_line1: string;
  city: string;
  postal_code: string | null;
  usage_class: number;
  gate_label: string;
  gate_kind: string;
  auditor_name: string;
  family: string;
  version: string;
  document_id: string;
  sha256: string;
  size_bytes: number;
  sort_key: string;
}

const BATCH = 500;

/** The signed reports matching `filter` and signed no later than `cutoff`, newest first, in batches. */
export async function* signedReportsFor(
  organisationId: string,
  timeZone: string,
  filter: ArchiveFilter,
  cutoff: string,
  knex: Knex = db(),
): AsyncGenerator<ExportRow> {
  const filtered = archiveBase(knex, organisationId);
  await applyArchiveFilter(filtered, knex, organisationId, filter, timeZone);
  let after: { key: string; id: string } | null = null;
  for (;;) {
    const query = filtered
      .clone()
      .join('documents as d', (j: Knex.JoinClause) => j.on('d.assessment_id', 'a.id').andOnVal('d.kind', 'signed_report'))
      .andWhere('d.created_at', '<=', cutoff);
    if (after) query.andWhereRaw(`(${archiveDateSql}, a.id) < (?::timestamptz, ?::uuid)`, [after.key, after.id]);
    const rows = (await query
      .select(
        'a.id as assessment_id',
        knex.raw(`${archiveDateSql} as archive_date`),
        knex.raw(`(${archiveDateSql})::text as sort_key`),
        'a.signed_at',
        'a.status',
        'a.verdict',
        'c.name as client_name',
        's.address_line1',
        's.city',
        's.postal_code',
        's.usage_class',
        'g.label as gate_label',
        'g.kind as gate_kind',
        ...archiveLookups(knex),
        'd.id as document_id',
        'd.sha256',
        'd.size_bytes',
      )
      .orderByRaw(`${archiveDateSql} desc, a.id desc`)
      .limit(BATCH)) as ExportRow[];
    for (const row of rows) yield row;
    if (rows.length < BATCH) return;
    const last = rows[rows.length - 1]!;
    after = { key: last.sort_key, id: last.assessment_id };
  }
}

/** A file name a person can read in the ZIP, safe on every operating system. */
export function pdfNameOf(row: Pick<ExportRow, 'archive_date' | 'client_name' | 'gate_label' | 'document_id'>, timeZone: string): string {
  const day = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(row.archive_date);
  const words = `${day} ${row.client_name} - ${row.gate_label}`
    .replace(/[\u0000-\u001f\u007f/\\:*?"<>|]+/g, '-')
    .replace(/\s+/g, ' ')
    .trim()
    .slice(0, 100);
  return `signed-reports/${words} - ${row.document_id.slice(0, 8)}.pdf`;
}

const indexHeader = [
  'file',
  'document_id',
  'sha256',
  'size_bytes',
  'assessment_id',
  'visit_date',
  'signed_at',
  'verdict',
  'client',
  'address',
  'city',
  'postal_code',
  'usage_class',
  'gate',
  'gate_kind',
  'ruleset_family',
  'ruleset_version',
  'auditor',
];

async function* indexCsv(rows: AsyncGenerator<ExportRow>, timeZone: string): AsyncGenerator<string> {
  yield csvRow(indexHeader);
  for await (const row of rows) {
    yield csvRow([
      pdfNameOf(row, timeZone),
      row.document_id,
      row.sha256,
      row.size_bytes,
      row.assessment_id,
      iso(row.archive_date),
      row.signed_at ? iso(row.signed_at) : null,
      row.verdict,
      row.client_name,
      row.address_line1,
      row.city,
      row.postal_code,
      row.usage_class,
      row.gate_label,
      row.gate_kind,
      row.family,
      row.version,
      row.auditor_name,
    ]);
  }
}

/** Resolves when the archive finished the entry it is writing, or it closed (aborted download). */
function entryDone(archive: ZipArchive): Promise<'entry' | 'closed'> {
  return new Promise((resolve, reject) => {
    const onEntry = () => finish('entry');
    const onClose = () => finish('closed');
    const onError = (error: Error) => {
      cleanup();
      reject(error);
    };
    const cleanup = () => {
      archive.off('entry', onEntry);
      archive.off('close', onClose);
      archive.off('error', onError);
    };
    const finish = (how: 'entry' | 'closed') => {
      cleanup();
      resolve(how);
    };
    archive.on('entry', onEntry);
    archive.on('close', onClose);
    archive.on('error', onError);
  });
}

export interface ExportStream {
  stream: ReadableStream<Uint8Array>;
  filename: string;
}

/** Starts the export; the ZIP is produced as the caller reads the returned stream. */
export async function exportSignedReports(organisationId: string, timeZone: string, filter: ArchiveFilter, knex: Knex = db()): Promise<ExportStream> {
  const [{ now }] = (await knex.raw('select now()::text as now')).rows as { now: string }[];
  const archive = new ZipArchive({ zlib: { level: 6 } });
  let closed = false;
  archive.on('close', () => (closed = true));
  archive.on('warning', (warning) => console.warn('[export] zip warning:', warning.message));

  const fill = async () => {
    archive.append(Readable.from(indexCsv(signedReportsFor(organisationId, timeZone, filter, now, knex), timeZone)), { name: 'index.csv' });
    if ((await entryDone(archive)) === 'closed') return;
    for await (const row of signedReportsFor(organisationId, timeZone, filter, now, knex)) {
      if (closed) return;
      const name = pdfNameOf(row, timeZone);
      const file = await storage().stream(row.sha256);
      if (file) archive.append(file, { name, store: true, date: row.signed_at ?? row.archive_date });
      else archive.append(`The signed report ${row.document_id} (SHA-256 ${row.sha256}) is missing from file storage.\n`, { name: `${name}.MISSING.txt` });
      if ((await entryDone(archive)) === 'closed') return;
    }
    await archive.finalize();
  };
  fill().catch((error: unknown) => {
    console.error('[export] aborted:', error instanceof Error ? error.message : error);
    archive.destroy(error instanceof Error ? error : new Error(String(error)));
  });

  const day = new Date().toISOString().slice(0, 10);
  return { stream: Readable.toWeb(archive) as ReadableStream<Uint8Array>, filename: `latchwell-signed-reports-${day}.zip` };
}
