/**
 * Bad input to the domain API: wrong types, missing and unknown fields, huge strings, NUL
 * characters, malformed JSON, wrong content types, oversize bodies, bad query parameters and
 * row-version headers. Each gets a 4xx problem+json naming the field at fault, never a stack
 * trace, and the database is exactly as it was (row counts and every column of every row).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory, snapshotTables, type Directory } from './support/domain';

interface BadRequest {
  name: string;
  method: 'GET' | 'POST' | 'PATCH';
  path: (d: Directory & { draftId: string }) => string;
  /** JSON body (stringified; a function gets the directory's ids), or a raw body with its own content type. */
  body?: unknown;
  raw?: { contentType: string | null; text: string };
  headers?: Record<string, string>;
  status: number;
  /** Fields that must be named in `errors`; `''` is the body or request as a whole. */
  fields: string[];
}

const long = (n: number) => 'x'.repeat(n);
const draftPatch = { 'if-match': '"1"' };

// prettier-ignore
const cases: BadRequest[] = [
  // Bodies: types, presence, unknown fields, sizes
  { name: 'a number where text belongs',     method: 'POST',  path: () => '/api/clients', body: { name: 42, kind: 'business' }, status: 422, fields: ['name'] },
  { name: 'missing required fields',         method: 'POST',  path: () => '/api/clients', body: {}, status: 422, fields: ['name', 'kind'] },
  { name: 'an unknown field',                method: 'POST',  path: () => '/api/clients', body: { name: 'Quarry Lane Flats', kind: 'business', organisationId: '00000000-0000-4000-8000-000000000000' }, status: 422, fields: ['organisationId'] },
  { name: 'a huge name',                     method: 'POST',  path: () => '/api/clients', body: { name: long(5000), kind: 'business' }, status: 422, fields: ['name'] },
  { name: 'huge notes',                      method: 'POST',  path: () => '/api/clients', body: { name: 'Notes Ltd', kind: 'business', notes: long(4001) }, status: 422, fields: ['notes'] },
  { name: 'a NUL character',                 method: 'POST',  path: () => '/api/clients', body: { name: 'Null\u0000Gates', kind: 'business' }, status: 422, fields: ['name'] },
  { name: 'a value outside the enum',        method: 'POST',  path: () => '/api/clients', body: { name: 'Enum Ltd', kind: 'landlord' }, status: 422, fields: ['kind'] },
  { name: 'a malformed e-mail and phone',    method: 'POST',  path: () => '/api/clients', body: { name: 'Contact Ltd', kind: 'business', contactEmail: 'not-an-address', phone: 'call me maybe' }, status: 422, fields: ['contactEmail', 'phone'] },
  { name: 'an array instead of an object',   method: 'POST',  path: () => '/api/clients', body: [{ name: 'Array Ltd', kind: 'business' }], status: 422, fields: [''] },
  { name: 'malformed JSON',                  method: 'POST',  path: () => '/api/clients', raw: { contentType: 'application/json', text: '{"name": "Broken Ltd",' }, status: 400, fields: [''] },
  { name: 'text/plain',                      method: 'POST',  path: () => '/api/clients', raw: { contentType: 'text/plain', text: '{"name":"Plain Ltd","kind":"business"}' }, status: 415, fields: [''] },
  { name: 'a form post',                     method: 'POST',  path: () => '/api/clients', raw: { contentType: 'application/x-www-form-urlencoded', text: 'name=Form+Ltd&kind=business' }, status: 415, fields: [''] },
  { name: 'no content type',                 method: 'POST',  path: () => '/api/clients', raw: { contentType: null, text: '{"name":"Bare Ltd","kind":"business"}' }, status: 415, fields: [''] },
  { name: 'an oversize body',                method: 'POST',  path: () => '/api/clients', raw: { contentType: 'application/json', text: JSON.stringify({ name: 'Big Ltd', kind: 'business', notes: long(300 * 1024) }) }, status: 413, fields: [] },
  { name: 'an empty patch',                  method: 'PATCH', path: (d) => `/api/clients/${d.clientId}`, body: {}, status: 422, fields: [''] },
  { name: 'clearing a required field',       method: 'PATCH', path: (d) => `/api/clients/${d.clientId}`, body: { name: null }, status: 422, fields: ['name'] },
  { name: 'patching the id',                 method: 'PATCH', path: (d) => `/api/clients/${d.clientId}`, body: { id: '00000000-0000-4000-8000-000000000000' }, status: 422, fields: ['id'] },
  { name: 'a site with several faults',      method: 'POST',  path: () => '/api/sites', body: { clientId: 'abc', usageClass: 5, country: 'USA' }, status: 422, fields: ['clientId', 'usageClass', 'country', 'addressLine1', 'city'] },
  { name: 'a usage class as text',           method: 'PATCH', path: (d) => `/api/sites/${d.siteId}`, body: { usageClass: '2' }, status: 422, fields: ['usageClass'] },
  { name: 'a gate with several faults',      method: 'POST',  path: () => '/api/gates', body: { siteId: 'x', label: long(121), kind: 'revolving', leaves: 'triple', widthMm: 12.5, installedOn: '2024-13-45', operator: { colour: 'green' } }, status: 422, fields: ['siteId', 'label', 'kind', 'leaves', 'widthMm', 'installedOn', 'operator.colour'] },
  { name: 'a measured width as words',       method: 'POST',  path: () => '/api/gates', body: (d: Directory) => ({ siteId: d.siteId, label: 'Words', kind: 'swing', leaves: 'single', width: { value: 'ten', unit: 'ft' } }), status: 422, fields: ['width.value'] },
  { name: 'a negative height',               method: 'PATCH', path: (d) => `/api/gates/${d.gateId}`, body: { heightMm: -5 }, status: 422, fields: ['heightMm'] },
  { name: 'operator facts of the wrong type', method: 'PATCH', path: (d) => `/api/gates/${d.gateId}`, body: { operator: { listed: 'yes', power: 'steam' } }, status: 422, fields: ['operator.listed', 'operator.power'] },
  { name: 'an empty assessment',             method: 'POST',  path: () => '/api/assessments', body: {}, status: 422, fields: ['gateId', 'family', 'purpose'] },
  { name: 'an assessment with bad values',   method: 'POST',  path: () => '/api/assessments', body: { gateId: 'gate-1', family: 'NOT A SLUG', purpose: 'audit', visitedOn: 'yesterday' }, status: 422, fields: ['gateId', 'family', 'purpose', 'visitedOn'] },
  // Draft saves
  { name: 'an answer under a bad key',       method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { answers: { 'Bad Key': { value: 'yes' } } }, status: 422, fields: ['answers.Bad Key'] },
  { name: 'a huge answer note',              method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { answers: { latchFitted: { value: 'yes', note: long(2001) } } }, status: 422, fields: ['answers.latchFitted.note'] },
  { name: 'an unknown field in an answer',   method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { answers: { latchFitted: { value: 'yes', photo: 'x' } } }, status: 422, fields: ['answers.latchFitted.photo'] },
  { name: 'an infinite measurement',         method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, raw: { contentType: 'application/merge-patch+json', text: '{"measurements":{"hingeGapMm":{"value":1e400,"unit":"mm"}}}' }, status: 422, fields: ['measurements.hingeGapMm.value'] },
  { name: 'an unknown observation',          method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { observations: { weather: 'rain' } }, status: 422, fields: ['observations.weather'] },
  { name: 'geometry of the wrong type',      method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { observations: { swingGeometry: { aMm: 'far' } } }, status: 422, fields: ['observations.swingGeometry.aMm'] },
  { name: 'setting the status directly',     method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { status: 'scored' }, status: 422, fields: ['status'] },
  { name: 'setting the row version directly', method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: draftPatch, body: { purpose: 'service', rowVersion: 9 }, status: 422, fields: ['rowVersion'] },
  { name: 'a weak ETag in If-Match',         method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, headers: { 'if-match': 'W/"1"' }, body: { purpose: 'service' }, status: 400, fields: ['If-Match'] },
  { name: 'a save without If-Match',         method: 'PATCH', path: (d) => `/api/assessments/${d.draftId}`, body: { purpose: 'service' }, status: 428, fields: ['If-Match'] },
  // Queries
  { name: 'a page size over the limit',      method: 'GET',   path: () => '/api/clients?pageSize=1000', status: 400, fields: ['pageSize'] },
  { name: 'page zero',                       method: 'GET',   path: () => '/api/clients?page=0', status: 400, fields: ['page'] },
  { name: 'sorting by an unknown column',    method: 'GET',   path: () => '/api/clients?sort=password_hash', status: 400, fields: ['sort'] },
  { name: 'an unknown query parameter',      method: 'GET',   path: () => '/api/clients?colour=red', status: 400, fields: ['colour'] },
  { name: 'a huge search text',              method: 'GET',   path: () => `/api/gates?q=${long(201)}`, status: 400, fields: ['q'] },
  { name: 'a usage class out of range',      method: 'GET',   path: () => '/api/sites?usageClass=9', status: 400, fields: ['usageClass'] },
  { name: 'an impossible date',              method: 'GET',   path: () => '/api/assessments?from=2026-02-30', status: 400, fields: ['from'] },
  { name: 'a date range backwards',          method: 'GET',   path: () => '/api/assessments?from=2026-03-10&to=2026-03-01', status: 400, fields: ['to'] },
  { name: 'an unknown status',               method: 'GET',   path: () => '/api/assessments?status=done&verdict=maybe', status: 400, fields: ['status', 'verdict'] },
  { name: 'a filter id that is not an id',   method: 'GET',   path: () => '/api/gates?siteId=1%20or%201=1', status: 400, fields: ['siteId'] },
];

let org: FixtureOrganisation;
let dir: Directory & { draftId: string };
let owner: TestClient;

beforeAll(async () => {
  org = await createOrganisation('bad-input');
  const directory = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  dir = { ...directory, draftId: await insertDraft(org.id, directory.gateId, org.auditor.id, version.id) };
  owner = await signIn(org.owner.email, fixturePassword);
});

function send(c: BadRequest): Promise<Response> {
  const headers = new Headers({ accept: 'application/json', ...c.headers });
  let body: string | undefined;
  if (c.raw) {
    if (c.raw.contentType) headers.set('content-type', c.raw.contentType);
    body = c.raw.text;
  } else if (c.body !== undefined) {
    headers.set('content-type', 'application/json');
    body = JSON.stringify(typeof c.body === 'function' ? c.body(dir) : c.body);
  }
  return owner.fetch(c.path(dir), { method: c.method, headers, body });
}

describe('bad input', () => {
  it('is refused with the field named, and leaves every row as it was', async () => {
    const before = await snapshotTables(org.id);
    for (const c of cases) {
      const res = await send(c);
      expect(res.status, c.name).toBe(c.status);
      expect(res.headers.get('content-type'), c.name).toContain('application/problem+json');
      const text = await res.text();
      expect(text, `${c.name}: no stack trace`).not.toMatch(/\n\s+at |\.(ts|js|mjs):\d+/);
      const problem = JSON.parse(text);
      expect(problem, c.name).toMatchObject({
        status: c.status,
        title: expect.any(String),
        type: expect.any(String),
      });
      const named = (problem.errors ?? []).map((e: { field: string }) => e.field);
      for (const field of c.fields) expect(named, `${c.name} names ${field || 'the body'}`).toContain(field);
      for (const error of problem.errors ?? []) expect(error.message, c.name).toEqual(expect.any(String));
    }
    expect(await snapshotTables(org.id)).toEqual(before);
  });

  it('answers an unknown id as not found, whatever it looks like', async () => {
    for (const path of [
      '/api/clients/not-a-uuid',
      "/api/gates/1'%20or%20'1'='1",
      '/api/sites/00000000-0000-4000-8000-000000000000',
      '/api/assessments/%00',
    ]) {
      const res = await owner.json('GET', path);
      expect(res.status, path).toBe(404);
      expect(res.headers.get('content-type')).toContain('application/problem+json');
    }
  });
});
