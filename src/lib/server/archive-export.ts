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
 *
 * Every file is hashed as its bytes go into the ZIP. A file whose bytes no longer give the
 * SHA-256 recorded at signing is never passed off as the signed report: `index.csv` (written
 * last, once every file has been checked) marks it `mismatch` with both hashes, and an
 * `archive.export_file_mismatch` audit event is written. The export also carries the audit
 * trail's head when it started (`audit-trail-head.json`, see audit-anchors.ts).
 */
import { createHash } from 'node:crypto';
import { PassThrough, Readable } from 'node:stream';
import { ZipArchive } from 'archiver';
import type { Knex } from 'knex';
import type { ArchiveFilter } from '@/lib/api/archive';
import { applyArchiveFilter, archiveBase, archiveDateSql, archiveLookups } from './archive-filters';
import { recordAudit } from './audit';
import { anchorText, type AuditAnchor } from './audit-anchors';
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
      .join('documents as d', (j: Knex.JoinClause) =>
        j.on('d.assessment_id', 'a.id').andOnVal('d.kind', 'signed_report'),
      )
      .andWhere('d.created_at', '<=', cutoff);
    if (after)
      query.andWhereRaw(`(${archiveDateSql}, a.id) < (?::timestamptz, ?::uuid)`, [after.key, after.id]);
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
export function pdfNameOf(
  row: Pick<ExportRow, 'archive_date' | 'client_name' | 'gate_label' | 'document_id'>,
  timeZone: string,
): string {
  const day = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
  }).format(row.archive_date);
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
  // `ok`: the file's bytes give the recorded sha256; `mismatch`: they do not (file_sha256 is what they give); `missing`: no file in storage.
  'file_check',
  'file_sha256',
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

/** What hashing a file on its way into the ZIP found, for the files that did not check out. */
type FileProblem = { check: 'mismatch'; actual: string } | { check: 'missing' };

async function* indexCsv(
  rows: AsyncGenerator<ExportRow>,
  timeZone: string,
  problems: Map<string, FileProblem>,
): AsyncGenerator<string> {
  yield csvRow(indexHeader);
  for await (const row of rows) {
    const problem = problems.get(row.document_id);
    yield csvRow([
      problem?.check === 'missing' ? `${pdfNameOf(row, timeZone)}.MISSING.txt` : pdfNameOf(row, timeZone),
      row.document_id,
      row.sha256,
      problem?.check ?? 'ok',
      problem?.check === 'mismatch' ? problem.actual : problem ? null : row.sha256,
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

async function recordMismatch(
  knex: Knex,
  organisationId: string,
  row: ExportRow,
  actual: string,
  actor: ExportOptions['actor'],
): Promise<void> {
  console.error(
    `[export] signed report ${row.document_id}: stored file gives SHA-256 ${actual}, recorded ${row.sha256}`,
  );
  await knex.transaction((trx) =>
    recordAudit(trx, {
      organisationId,
      actorUserId: actor?.userId ?? null,
      actorLabel: actor?.label ?? null,
      action: 'archive.export_file_mismatch',
      entityType: 'document',
      entityId: row.document_id,
      ip: actor?.ip ?? null,
      detail: { assessmentId: row.assessment_id, expectedSha256: row.sha256, actualSha256: actual },
    }),
  );
}

export interface ExportStream {
  stream: ReadableStream<Uint8Array>;
  filename: string;
}

export interface ExportOptions {
  /** The audit trail's head when the export started (its `archive.exported` event). */
  auditHead?: AuditAnchor | null;
  /** Who exported, for the audit event a mismatched file writes. */
  actor?: { userId: string; label: string; ip: string | null };
}

/** Starts the export; the ZIP is produced as the caller reads the returned stream. */
export async function exportSignedReports(
  organisationId: string,
  timeZone: string,
  filter: ArchiveFilter,
  knex: Knex = db(),
  options: ExportOptions = {},
): Promise<ExportStream> {
  const [{ now }] = (await knex.raw('select now()::text as now')).rows as { now: string }[];
  const archive = new ZipArchive({ zlib: { level: 6 } });
  let closed = false;
  archive.on('close', () => (closed = true));
  archive.on('warning', (warning) => console.warn('[export] zip warning:', warning.message));

  const problems = new Map<string, FileProblem>();
  const fill = async () => {
    if (options.auditHead) {
      const head = {
        eventId: options.auditHead.eventId,
        hash: options.auditHead.hash,
        anchor: anchorText(options.auditHead),
        exportedAt: now,
      };
      archive.append(`${JSON.stringify(head, null, 2)}\n`, { name: 'audit-trail-head.json' });
      if ((await entryDone(archive)) === 'closed') return;
    }
    for await (const row of signedReportsFor(organisationId, timeZone, filter, now, knex)) {
      if (closed) return;
      const name = pdfNameOf(row, timeZone);
      const file = await storage().stream(row.sha256);
      if (!file) {
        problems.set(row.document_id, { check: 'missing' });
        archive.append(
          `The signed report ${row.document_id} (SHA-256 ${row.sha256}) is missing from file storage.\n`,
          { name: `${name}.MISSING.txt` },
        );
        if ((await entryDone(archive)) === 'closed') return;
        continue;
      }
      // Hash the bytes exactly as they go into the ZIP.
      const hash = createHash('sha256');
      const tap = new PassThrough();
      tap.on('data', (chunk: Buffer) => hash.update(chunk));
      file.on('error', (error) => tap.destroy(error));
      archive.append(file.pipe(tap), { name, store: true, date: row.signed_at ?? row.archive_date });
      if ((await entryDone(archive)) === 'closed') return;
      const actual = hash.digest('hex');
      if (actual !== row.sha256) {
        problems.set(row.document_id, { check: 'mismatch', actual });
        await recordMismatch(knex, organisationId, row, actual, options.actor);
        archive.append(
          `${name} is NOT the signed report as recorded: its bytes give SHA-256 ${actual}, but the report was signed with SHA-256 ${row.sha256}. The stored file was changed after signing.\n`,
          { name: `${name}.SHA-256-MISMATCH.txt` },
        );
        if ((await entryDone(archive)) === 'closed') return;
      }
    }
    // The index goes last: only now is every file's check known.
    archive.append(
      Readable.from(
        indexCsv(signedReportsFor(organisationId, timeZone, filter, now, knex), timeZone, problems),
      ),
      { name: 'index.csv' },
    );
    if ((await entryDone(archive)) === 'closed') return;
    await archive.finalize();
  };
  fill().catch((error: unknown) => {
    console.error('[export] aborted:', error instanceof Error ? error.message : error);
    archive.destroy(error instanceof Error ? error : new Error(String(error)));
  });

  const day = new Date().toISOString().slice(0, 10);
  return {
    stream: Readable.toWeb(archive) as ReadableStream<Uint8Array>,
    filename: `latchwell-signed-reports-${day}.zip`,
  };
}
