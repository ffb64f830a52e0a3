/**
 * The export checks every stored file against the SHA-256 recorded at signing while it streams
 * it into the ZIP. A signed PDF changed on disk afterwards is never passed off as genuine: the
 * index marks it `mismatch` with the recorded and the actual hash, a note beside it says so,
 * and an audit event records it. Untouched files are marked `ok`.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPrng, sampleGate } from '../support/archive-samples';
import {
  addClient,
  addGate,
  addSite,
  fileAssessment,
  publishedVersion,
  readZip,
  type FiledAssessment,
} from './support/archive';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

let org: FixtureOrganisation;
let office: TestClient;
let intact: FiledAssessment;
let altered: FiledAssessment;
let storedFile: string;

beforeAll(async () => {
  org = await createOrganisation('export-integrity');
  office = await signIn(org.office.email, fixturePassword);
  const version = await publishedVersion('north-american-gate', '2026.1');
  const prng = createPrng(20261204);
  const client = await addClient(org.id, 'Larchmere Storage');
  const site = await addSite(org.id, client, '5 Larchmere Yard', 'Northwick', 3);
  const gate = { ...sampleGate(prng), kind: 'slide' as const, openingDirection: null };
  const gateId = await addGate(org.id, site, 'Yard slider', gate);
  const common = {
    organisationId: org.id,
    gateId,
    auditorId: org.auditor.id,
    version,
    gate,
    usageClass: 3,
    prng,
  };
  intact = await fileAssessment({ ...common, visitedOn: '2026-05-04T09:00:00Z' });
  altered = await fileAssessment({ ...common, visitedOn: '2026-06-04T09:00:00Z' });
  // Change the signed report's bytes where the server keeps them (disk storage, sharded by hash).
  storedFile = path.join(inject('dataDir'), 'files', altered.pdfSha256!.slice(0, 2), altered.pdfSha256!);
  fs.chmodSync(storedFile, 0o644);
  fs.writeFileSync(
    storedFile,
    Buffer.concat([altered.pdf!, Buffer.from('% quietly appended after signing\n')]),
  );
});

afterAll(() => {
  fs.writeFileSync(storedFile, altered.pdf!);
  fs.chmodSync(storedFile, 0o444);
});

describe('archive export file check', () => {
  it('marks a stored file that no longer matches its recorded SHA-256, names both hashes and audits it', async () => {
    const res = await office.fetch('/api/archive/export');
    expect(res.status).toBe(200);
    const entries = readZip(Buffer.from(await res.arrayBuffer()));
    const lines = entries.get('index.csv')!.toString('utf8').trim().split('\r\n');
    const header = lines[0]!.split(',');
    const column = (line: string, name: string) => line.split(',')[header.indexOf(name)];
    expect(header.slice(0, 5)).toEqual(['file', 'document_id', 'sha256', 'file_check', 'file_sha256']);
    expect(lines).toHaveLength(3);

    const good = lines.find((l) => l.includes(intact.documentId!))!;
    expect(column(good, 'file_check')).toBe('ok');
    expect(column(good, 'file_sha256')).toBe(intact.pdfSha256);
    expect(entries.get(column(good, 'file')!)?.equals(intact.pdf!)).toBe(true);

    const bad = lines.find((l) => l.includes(altered.documentId!))!;
    const actual = sha256(fs.readFileSync(storedFile));
    expect(column(bad, 'sha256')).toBe(altered.pdfSha256);
    expect(column(bad, 'file_check')).toBe('mismatch');
    expect(column(bad, 'file_sha256')).toBe(actual);
    const name = column(bad, 'file')!;
    expect(sha256(entries.get(name)!)).toBe(actual);
    const note = entries.get(`${name}.SHA-256-MISMATCH.txt`)!.toString('utf8');
    expect(note).toContain(actual);
    expect(note).toContain(altered.pdfSha256!);

    const event = await testDb()('audit_events')
      .where({
        organisation_id: org.id,
        action: 'archive.export_file_mismatch',
        entity_id: altered.documentId,
      })
      .first('detail', 'actor_label');
    expect(event).toMatchObject({
      actor_label: org.office.email,
      detail: { assessmentId: altered.id, expectedSha256: altered.pdfSha256, actualSha256: actual },
    });
    expect(
      await testDb()('audit_events')
        .where({
          organisation_id: org.id,
          action: 'archive.export_file_mismatch',
          entity_id: intact.documentId,
        })
        .first(),
    ).toBeUndefined();
  });
});
