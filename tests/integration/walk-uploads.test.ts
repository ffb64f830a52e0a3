/**
 * Photos and force traces sent from the walk-through: type checked by content, size limit
 * with a clear message, EXIF orientation applied with a display size and a thumbnail, files
 * stored by SHA-256, metadata in PostgreSQL, retries stored once; force-meter CSV parsed and
 * judged, a malformed file refused naming its line.
 */
import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory } from './support/domain';

let org: FixtureOrganisation;
let auditor: TestClient;
let auditor2: TestClient;
let draftId: string;

/** A 1200×900 phone picture stored sideways (EXIF orientation 6), taken at a known time. */
async function phonePhoto(): Promise<Buffer> {
  return sharp({ create: { width: 1200, height: 900, channels: 3, background: '#c98b16' } })
    .jpeg({ quality: 80 })
    .withExif({ IFD2: { DateTimeOriginal: '2026:11:30 09:15:00' } })
    .withMetadata({ orientation: 6 })
    .toBuffer();
}

function photoForm(
  bytes: Uint8Array,
  fields: Record<string, string> = {},
  name = 'hinge.jpg',
  type = 'image/jpeg',
): FormData {
  const form = new FormData();
  form.set('photo', new Blob([new Uint8Array(bytes)], { type }), name);
  form.set('itemKey', fields.itemKey ?? 'hingeGapMm');
  for (const [key, value] of Object.entries(fields)) if (key !== 'itemKey') form.set(key, value);
  return form;
}

const upload = (client: TestClient, form: FormData, id = draftId) =>
  client.fetch(`/api/assessments/${id}/photos`, {
    method: 'POST',
    body: form,
    headers: { accept: 'application/json' },
  });

/** Seven seconds at 500 Hz: contact at 1 s, a 260 N peak, under 150 N within 0.3 s, settling at 10 N. */
function passingTrace(separator = ',', decimal = '.'): string {
  const rows = [`time [s]${separator}force [N]`];
  for (let i = 0; i <= 3500; i += 1) {
    const t = i / 500;
    const f =
      t < 1
        ? 0
        : t < 1.1
          ? (t - 1) * 2600
          : t < 1.4
            ? 260 - (t - 1.1) * 533
            : t < 3
              ? Math.max(10, 100 - (t - 1.4) * 56)
              : 10;
    rows.push(`${t.toFixed(3).replace('.', decimal)}${separator}${f.toFixed(1).replace('.', decimal)}`);
  }
  return rows.join('\n');
}

const traceQuery = (extra: Record<string, string> = {}) =>
  new URLSearchParams({
    itemKey: 'forceTest.closing_edge',
    location: 'closing_edge',
    direction: 'closing',
    gapMm: '300',
    fileName: 'edge.csv',
    ...extra,
  }).toString();
const sendTrace = (client: TestClient, csv: string, extra: Record<string, string> = {}) =>
  client.fetch(`/api/assessments/${draftId}/force-traces?${traceQuery(extra)}`, {
    method: 'POST',
    headers: { 'content-type': 'text/csv', accept: 'application/json' },
    body: csv,
  });

beforeAll(async () => {
  org = await createOrganisation('walk uploads');
  const dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  draftId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
  [auditor, auditor2] = await Promise.all([
    signIn(org.auditor.email, fixturePassword),
    signIn(org.auditor2.email, fixturePassword),
  ]);
});

describe('photo uploads', () => {
  it('turns a sideways phone photo upright, makes a display size and a thumbnail, and keeps its metadata', async () => {
    const original = await phonePhoto();
    const res = await upload(
      auditor,
      photoForm(original, {
        clientRef: '3f6c2a1e-8b4d-4c7a-9e2f-1a2b3c4d5e6f',
        takenAt: '2026-12-01T10:00:00Z',
      }),
    );
    expect(res.status).toBe(201);
    const photo = await res.json();
    // Orientation 6 is a quarter turn: 1200×900 as stored is 900×1200 upright, then fitted in 1600.
    expect({ width: photo.width, height: photo.height }).toEqual({ width: 900, height: 1200 });
    // The camera's own time wins over the device's file time.
    expect(photo.takenAt).toBe('2026-11-30T09:15:00.000Z');

    const row = await testDb()('assessment_photos').where({ id: photo.id }).first();
    expect(row).toMatchObject({
      item_key: 'hingeGapMm',
      original_content_type: 'image/jpeg',
      original_bytes: original.byteLength,
      original_filename: 'hinge.jpg',
      uploaded_by: org.auditor.id,
    });
    expect(row.original_sha256).toBe(createHash('sha256').update(original).digest('hex'));

    const display = await auditor.fetch(photo.displayUrl);
    expect(display.headers.get('content-type')).toBe('image/jpeg');
    const displayBytes = Buffer.from(await display.arrayBuffer());
    expect(createHash('sha256').update(displayBytes).digest('hex')).toBe(row.display_sha256);
    expect(display.headers.get('etag')).toBe(`"${row.display_sha256}"`);
    const displayMeta = await sharp(displayBytes).metadata();
    expect({
      w: displayMeta.width,
      h: displayMeta.height,
      orientation: displayMeta.orientation ?? 1,
      exif: displayMeta.exif,
    }).toEqual({
      w: 900,
      h: 1200,
      orientation: 1,
      exif: undefined,
    });

    const thumb = await sharp(
      Buffer.from(await (await auditor.fetch(photo.thumbUrl)).arrayBuffer()),
    ).metadata();
    expect(Math.max(thumb.width ?? 0, thumb.height ?? 0)).toBe(320);
    expect((thumb.height ?? 0) > (thumb.width ?? 0)).toBe(true);
  });

  it('stores a photo sent twice by the device (a retry after a dropped answer) once', async () => {
    const form = () =>
      photoForm(Buffer.from([0xff, 0xd8, 0xff]), { clientRef: '3f6c2a1e-8b4d-4c7a-9e2f-1a2b3c4d5e6f' });
    const again = await upload(auditor, form());
    expect(again.status).toBe(200);
    expect(
      await testDb()('assessment_photos')
        .where({ assessment_id: draftId, client_ref: '3f6c2a1e-8b4d-4c7a-9e2f-1a2b3c4d5e6f' })
        .count('* as n')
        .first(),
    ).toEqual({ n: '1' });
  });

  it('checks the type by content: a PDF named .jpg is refused, naming what it is', async () => {
    const pdf = Buffer.from(
      '%PDF-1.7\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n',
    );
    const res = await upload(auditor, photoForm(pdf, {}, 'gate.jpg', 'image/jpeg'));
    expect(res.status).toBe(415);
    const problem = await res.json();
    expect(problem.detail).toMatch(/PDF file.*Send a JPEG, PNG, WebP or AVIF photo/);
    expect(problem.errors).toEqual([{ field: 'photo', message: expect.stringMatching(/JPEG/) }]);
  });

  it('refuses a photo over the limit with the limit in the message, and stores nothing', async () => {
    const before = await testDb()('assessment_photos')
      .where({ assessment_id: draftId })
      .count('* as n')
      .first();
    const huge = Buffer.alloc(16 * 1024 * 1024, 7);
    const res = await upload(auditor, photoForm(huge, {}, 'huge.jpg'));
    expect(res.status).toBe(413);
    expect((await res.json()).detail).toMatch(/15 MB.*Take it again at a lower resolution/);
    expect(
      await testDb()('assessment_photos').where({ assessment_id: draftId }).count('* as n').first(),
    ).toEqual(before);
  });

  it('refuses a photo without a walk-through item, or with a malformed device id', async () => {
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } })
      .png()
      .toBuffer();
    const res = await upload(
      auditor,
      photoForm(png, { itemKey: '../etc', clientRef: 'not-a-uuid' }, 'a.png', 'image/png'),
    );
    expect(res.status).toBe(422);
    expect((await res.json()).errors.map((e: { field: string }) => e.field).sort()).toEqual([
      'clientRef',
      'itemKey',
    ]);
  });

  it("keeps the camera file's hash, size and orientation that the phone sends with a reduced copy", async () => {
    const camera = await phonePhoto();
    // What the phone uploads instead: upright already, smaller, without EXIF.
    const reduced = await sharp(camera).rotate().resize({ width: 450 }).jpeg({ quality: 80 }).toBuffer();
    const cameraSha = createHash('sha256').update(camera).digest('hex');
    const res = await upload(
      auditor,
      photoForm(reduced, {
        sourceSha256: cameraSha,
        sourceBytes: String(camera.byteLength),
        orientation: '6',
        takenAt: '2026-11-30T09:15:00Z',
      }),
    );
    expect(res.status).toBe(201);
    const photo = await res.json();
    expect(photo).toMatchObject({
      sourceSha256: cameraSha,
      sourceBytes: camera.byteLength,
      originalBytes: reduced.byteLength,
      width: 450,
      height: 600,
    });
    expect(photo.takenAt).toBe('2026-11-30T09:15:00.000Z');
    const row = await testDb()('assessment_photos').where({ id: photo.id }).first();
    expect(row).toMatchObject({
      source_sha256: cameraSha,
      source_bytes: String(camera.byteLength),
      source_orientation: 6,
      original_sha256: createHash('sha256').update(reduced).digest('hex'),
    });
  });

  it('takes the uploaded file as the camera file when the phone sent it unchanged', async () => {
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#123' } })
      .png()
      .toBuffer();
    const photo = await (await upload(auditor, photoForm(png, {}, 'b.png', 'image/png'))).json();
    expect(photo).toMatchObject({
      sourceSha256: createHash('sha256').update(png).digest('hex'),
      sourceBytes: png.byteLength,
    });
  });

  it('refuses malformed camera-file facts and stores nothing', async () => {
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } })
      .png()
      .toBuffer();
    const before = await testDb()('assessment_photos')
      .where({ assessment_id: draftId })
      .count('* as n')
      .first();
    const bad = await upload(
      auditor,
      photoForm(png, { sourceSha256: 'ABC', sourceBytes: '-1', orientation: '9' }, 'a.png', 'image/png'),
    );
    expect(bad.status).toBe(422);
    expect((await bad.json()).errors.map((e: { field: string }) => e.field).sort()).toEqual([
      'orientation',
      'sourceBytes',
      'sourceSha256',
    ]);
    // A hash without its size (or the other way round) is half a fact.
    const half = await upload(
      auditor,
      photoForm(png, { sourceSha256: 'a'.repeat(64) }, 'a.png', 'image/png'),
    );
    expect(half.status).toBe(422);
    expect((await half.json()).errors).toEqual([
      { field: 'sourceBytes', message: 'send sourceSha256 and sourceBytes together' },
    ]);
    // Orientation 8 is the last valid one; 1 the first.
    const edge = await upload(
      auditor,
      photoForm(
        png,
        { sourceSha256: 'b'.repeat(64), sourceBytes: '1', orientation: '8' },
        'a.png',
        'image/png',
      ),
    );
    expect(edge.status).toBe(201);
    expect(
      await testDb()('assessment_photos').where({ assessment_id: draftId }).count('* as n').first(),
    ).toEqual({ n: String(Number(before?.n) + 1) });
  });

  it("keeps another auditor's hands off this draft's photos", async () => {
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } })
      .png()
      .toBuffer();
    expect((await upload(auditor2, photoForm(png, {}, 'a.png', 'image/png'))).status).toBe(403);
  });

  it('removes a photo from the draft', async () => {
    const [photo] = await (await auditor.fetch(`/api/assessments/${draftId}/photos`)).json();
    expect(
      (await auditor.fetch(`/api/assessments/${draftId}/photos/${photo.id}`, { method: 'DELETE' })).status,
    ).toBe(204);
    expect((await auditor.fetch(photo.thumbUrl)).status).toBe(404);
  });
});

describe('force-trace uploads', () => {
  it('parses a semicolon and decimal-comma file, judges it against the limit for the gap, and keeps the file by SHA-256', async () => {
    const csv = passingTrace(';', ',');
    const res = await sendTrace(auditor, csv, { clientRef: '8c1d2e3f-4a5b-4c6d-8e7f-901a2b3c4d5e' });
    expect(res.status).toBe(201);
    const trace = await res.json();
    expect(trace).toMatchObject({
      location: 'closing_edge',
      direction: 'closing',
      gapMm: 300,
      label: 'edge.csv',
    });
    expect(trace.samples).toHaveLength(3501);
    // EN 12453: 400 N peak for a 50–500 mm gap; 150 N static, 25 N residual 5 s after contact.
    expect(trace.evaluation).toMatchObject({
      zone: 'gap_50_500',
      overallPass: true,
      limits: { peakN: 400, maxStaticN: 150, maxResidualN: 25 },
    });
    const row = await testDb()('force_traces').where({ id: trace.id }).first();
    expect(row.csv_sha256).toBe(createHash('sha256').update(csv, 'utf8').digest('hex'));
    expect(
      (await sendTrace(auditor, csv, { clientRef: '8c1d2e3f-4a5b-4c6d-8e7f-901a2b3c4d5e' })).status,
    ).toBe(200);
  });

  it('refuses a malformed file with a message that names the line', async () => {
    const res = await sendTrace(auditor, 'time,force\n0.000,0\n0.002,0\n0.004,zz\n');
    expect(res.status).toBe(422);
    const problem = await res.json();
    expect(problem.detail).toMatch(/^Line 4: /);
    expect(problem.line).toBe(4);
    expect(problem.errors[0].field).toBe('csv.line4');
  });

  it('refuses a trace sampled too slowly to judge, saying so', async () => {
    const slow = [
      't,f',
      ...Array.from({ length: 80 }, (_, i) => `${(i / 10).toFixed(1)},${i > 10 ? 100 : 0}`),
    ].join('\n');
    const res = await sendTrace(auditor, slow);
    expect(res.status).toBe(422);
    expect((await res.json()).detail).toMatch(/200 Hz/);
  });
});
