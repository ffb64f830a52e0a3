/**
 * Archive fixtures: clients, sites and gates with invented names, and assessments filed
 * straight into the test database as the signing flow would leave them — scored by the real
 * engine against a published version, signed, with a final PDF stored content-addressed in the
 * server's data folder — so archive tests do not depend on walking every assessment through
 * the signing endpoints.
 */
import { randomBytes, randomUUID } from 'node:crypto';
import path from 'node:path';
import { inflateRawSync } from 'node:zlib';
import { inject } from 'vitest';
import { loadRulesetFile, resultSha256, scoreParsed, type LoadedRuleset } from '../../../src/lib/rules';
import { buildEngineInput } from '../../../src/lib/server/assessment-input';
import { createDiskStorage } from '../../../src/lib/server/storage/disk';
import {
  createPrng,
  sampleDocuments,
  sampleGate,
  type Prng,
  type SampleDocuments,
  type SampleGate,
} from '../../support/archive-samples';
import { testDb } from './fixtures';

const tag = () => randomBytes(3).toString('hex');

/** The server's file storage (the test server runs with LATCHWELL_DATA_DIR = inject('dataDir')). */
export const serverStorage = () => createDiskStorage(path.join(inject('dataDir'), 'files'));

export async function addClient(
  organisationId: string,
  name: string,
  email: string | null = `office.${tag()}@clients.test`,
): Promise<string> {
  const [row] = await testDb()('clients')
    .insert({ organisation_id: organisationId, name, kind: 'property_manager', contact_email: email })
    .returning('id');
  return row.id;
}

export async function addSite(
  organisationId: string,
  clientId: string,
  address: string,
  city = 'Eastholm',
  usageClass = 1,
  postalCode: string | null = null,
): Promise<string> {
  const [row] = await testDb()('sites')
    .insert({
      organisation_id: organisationId,
      client_id: clientId,
      address_line1: address,
      city,
      usage_class: usageClass,
      postal_code: postalCode,
    })
    .returning('id');
  return row.id;
}

export async function addGate(
  organisationId: string,
  siteId: string,
  label: string,
  gate: SampleGate,
  fields: Record<string, unknown> = {},
): Promise<string> {
  const [row] = await testDb()('gates')
    .insert({
      organisation_id: organisationId,
      site_id: siteId,
      label,
      kind: gate.kind,
      leaves: gate.leaves,
      opening_direction: gate.openingDirection,
      width_mm: gate.widthMm,
      height_mm: gate.heightMm,
      weight_kg: gate.weightKg,
      entered: JSON.stringify(gate.entered),
      operator: JSON.stringify(gate.operator),
      ...fields,
    })
    .returning('id');
  return row.id;
}

export interface PublishedVersion {
  id: string;
  family: string;
  version: string;
  loaded: LoadedRuleset;
}

/** A published shipped version, loaded for the engine. */
export async function publishedVersion(family: string, version: string): Promise<PublishedVersion> {
  const row = await testDb()('ruleset_versions as rv')
    .join('rulesets as r', 'r.id', 'rv.ruleset_id')
    .whereNull('r.organisation_id')
    .andWhere({ 'r.family': family, 'rv.version': version, 'rv.status': 'published' })
    .first('rv.id', 'rv.content');
  if (!row) throw new Error(`${family} ${version} is not published in the test database`);
  return { id: row.id, family, version, loaded: loadRulesetFile(row.content) };
}

export interface FiledAssessment {
  id: string;
  verdict: 'clear' | 'remedy' | 'withdraw' | null;
  documentId: string | null;
  pdf: Buffer | null;
  pdfSha256: string | null;
}

export interface FileOptions {
  organisationId: string;
  gateId: string;
  auditorId: string;
  version: PublishedVersion;
  /** The gate as scored (the row's own values by default are not read: pass what was inserted). */
  gate: SampleGate;
  usageClass: number;
  visitedOn: string;
  status?: 'draft' | 'scored' | 'awaiting_signature' | 'signed';
  documents?: SampleDocuments;
  prng?: Prng;
}

/** Scores sample documents with the real engine and files the assessment (signed: with its PDF). */
export async function fileAssessment(options: FileOptions): Promise<FiledAssessment> {
  const status = options.status ?? 'signed';
  const documents =
    options.documents ??
    sampleDocuments(options.prng ?? createPrng(Date.now() & 0xffff), options.version.loaded.version);
  const id = randomUUID();
  const row: Record<string, unknown> = {
    id,
    organisation_id: options.organisationId,
    gate_id: options.gateId,
    ruleset_version_id: options.version.id,
    auditor_id: options.auditorId,
    status,
    purpose: 'inspection',
    answers: JSON.stringify(documents.answers),
    measurements: JSON.stringify(documents.measurements),
    observations: JSON.stringify(documents.observations),
    visited_on: options.visitedOn,
  };
  let verdict: FiledAssessment['verdict'] = null;
  if (status !== 'draft') {
    const built = buildEngineInput(
      { ...options.gate, usageClass: options.usageClass } as never,
      documents as never,
    );
    if (!built.ok) throw new Error(`sample documents do not build: ${JSON.stringify(built.errors)}`);
    const result = scoreParsed(built.value, options.version.loaded);
    verdict = result.verdict;
    Object.assign(row, {
      result: JSON.stringify(result),
      result_sha256: resultSha256(result),
      verdict,
      gate_snapshot: JSON.stringify({ ...options.gate, site: { usageClass: options.usageClass } }),
      submitted_at: options.visitedOn,
    });
  }
  if (status === 'signed') row.signed_at = new Date(Date.parse(options.visitedOn) + 3600_000).toISOString();
  await testDb()('assessments').insert(row);
  if (status !== 'signed') return { id, verdict, documentId: null, pdf: null, pdfSha256: null };

  const pdf = Buffer.from(
    `%PDF-1.7\n% Latchwell archive test report ${id}\n1 0 obj << /Type /Catalog >> endobj\n%%EOF\n`,
  );
  const stored = await serverStorage().put(pdf, 'application/pdf');
  const [document] = await testDb()('documents')
    .insert({
      organisation_id: options.organisationId,
      assessment_id: id,
      kind: 'signed_report',
      sha256: stored.key,
      storage_key: stored.key,
      size_bytes: pdf.byteLength,
      filename: `report-${id.slice(0, 8)}.pdf`,
      created_at: row.signed_at,
    })
    .returning('id');
  return { id, verdict, documentId: document.id, pdf, pdfSha256: stored.key };
}

/** Reads a whole JSON response, failing the test with the body when the status is not `status`. */
export async function expectJson<T>(res: Response, status = 200): Promise<T> {
  const text = await res.text();
  if (res.status !== status) throw new Error(`expected ${status}, got ${res.status}: ${text.slice(0, 500)}`);
  return JSON.parse(text) as T;
}

/** The entries of a (small, non-ZIP64) ZIP file, read from its central directory. */
export function readZip(zip: Buffer): Map<string, Buffer> {
  let eocd = zip.length - 22;
  while (eocd >= 0 && zip.readUInt32LE(eocd) !== 0x06054b50) eocd--;
  if (eocd < 0) throw new Error('not a ZIP file: no end of central directory');
  const count = zip.readUInt16LE(eocd + 10);
  let at = zip.readUInt32LE(eocd + 16);
  const entries = new Map<string, Buffer>();
  for (let i = 0; i < count; i++) {
    if (zip.readUInt32LE(at) !== 0x02014b50) throw new Error('broken central directory');
    const method = zip.readUInt16LE(at + 10);
    const compressed = zip.readUInt32LE(at + 20);
    const nameLength = zip.readUInt16LE(at + 28);
    const extraLength = zip.readUInt16LE(at + 30);
    const commentLength = zip.readUInt16LE(at + 32);
    const local = zip.readUInt32LE(at + 42);
    const name = zip.subarray(at + 46, at + 46 + nameLength).toString('utf8');
    const dataStart = local + 30 + zip.readUInt16LE(local + 26) + zip.readUInt16LE(local + 28);
    const data = zip.subarray(dataStart, dataStart + compressed);
    entries.set(name, method === 0 ? Buffer.from(data) : inflateRawSync(data));
    at += 46 + nameLength + extraLength + commentLength;
  }
  return entries;
}
