/**
 * The archive over HTTP: search in a few keystrokes (client, address or gate label), every
 * filter, keyset paging both ways, the count, the streamed ZIP export and one gate's history.
 * One organisation of invented clients, filed directly with engine-scored results.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { ArchiveItem, ArchivePage } from '../../src/lib/api/archive';
import type { GateHistory } from '../../src/lib/server/gate-history';
import { createPrng, sampleGate } from '../support/archive-samples';
import {
  createOrganisation,
  fixturePassword,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import {
  addClient,
  addGate,
  addSite,
  expectJson,
  fileAssessment,
  publishedVersion,
  readZip,
  type FiledAssessment,
} from './support/archive';

let org: FixtureOrganisation;
let office: TestClient;
let stranger: TestClient;
const filed: Record<string, FiledAssessment> = {};
const gates: Record<string, string> = {};

beforeAll(async () => {
  org = await createOrganisation('archive');
  const other = await createOrganisation('archive-other');
  [office, stranger] = await Promise.all([
    signIn(org.office.email, fixturePassword),
    signIn(other.owner.email, fixturePassword),
  ]);
  const [v2015, v2026] = await Promise.all([
    publishedVersion('north-american-gate', '2015.1'),
    publishedVersion('north-american-gate', '2026.1'),
  ]);
  const prng = createPrng(20261202);

  const lettings = await addClient(org.id, 'Harrowgate Lettings');
  const household = await addClient(org.id, 'Moss and Pell Household');
  const storage = await addClient(org.id, 'Quarry Lane Storage');
  const fennick = await addSite(org.id, lettings, '14 Fennick Row', 'Eastholm', 1, 'EH4 2QT');
  const tollbar = await addSite(org.id, storage, '3 Tollbar Yard', 'Westmarch', 3);
  const close = await addSite(org.id, household, '88 Harrowgate Close', 'Eastholm', 2);

  const swingA = { ...sampleGate(prng), kind: 'swing' as const, openingDirection: 'pull_to_open' as const };
  const slideA = { ...sampleGate(prng), kind: 'slide' as const, openingDirection: null };
  const slideC = { ...sampleGate(prng), kind: 'slide' as const, openingDirection: null };
  const swingB = { ...sampleGate(prng), kind: 'swing' as const, openingDirection: 'push_to_open' as const };
  gates.frontDrive = await addGate(org.id, fennick, 'Front drive swing', swingA);
  gates.rearYard = await addGate(org.id, fennick, 'Rear yard slider', slideA);
  gates.depot = await addGate(org.id, tollbar, 'Depot main gate', slideC);
  gates.courtyard = await addGate(org.id, close, 'Courtyard gate', swingB);

  const base = { organisationId: org.id, auditorId: org.auditor.id, prng };
  filed.front2025 = await fileAssessment({
    ...base,
    gateId: gates.frontDrive,
    gate: swingA,
    usageClass: 1,
    version: v2015,
    visitedOn: '2025-03-10T10:00:00Z',
  });
  filed.front2026 = await fileAssessment({
    ...base,
    gateId: gates.frontDrive,
    gate: swingA,
    usageClass: 1,
    version: v2026,
    visitedOn: '2026-03-12T10:00:00Z',
  });
  filed.rear = await fileAssessment({
    ...base,
    gateId: gates.rearYard,
    gate: slideA,
    usageClass: 1,
    version: v2026,
    visitedOn: '2026-05-01T09:00:00Z',
  });
  filed.depot = await fileAssessment({
    ...base,
    auditorId: org.auditor2.id,
    gateId: gates.depot,
    gate: slideC,
    usageClass: 3,
    version: v2026,
    visitedOn: '2026-06-15T13:00:00Z',
  });
  filed.depotDraft = await fileAssessment({
    ...base,
    gateId: gates.depot,
    gate: slideC,
    usageClass: 3,
    version: v2026,
    visitedOn: '2026-11-01T08:00:00Z',
    status: 'draft',
  });
  filed.courtyardScored = await fileAssessment({
    ...base,
    gateId: gates.courtyard,
    gate: swingB,
    usageClass: 2,
    version: v2026,
    visitedOn: '2026-09-20T15:00:00Z',
    status: 'scored',
  });
  filed.courtyard2024 = await fileAssessment({
    ...base,
    gateId: gates.courtyard,
    gate: swingB,
    usageClass: 2,
    version: v2026,
    visitedOn: '2024-09-20T15:00:00Z',
  });
});

const list = async (client: TestClient, query: string) =>
  expectJson<ArchivePage>(await client.fetch(`/api/archive?${query}`));
const idsOf = (items: ArchiveItem[]) => items.map((i) => i.id).sort();
const ids = (...keys: string[]) => keys.map((k) => filed[k]!.id).sort();
/** Newest visit first, as the default sort files them. */
const byDateDesc = [
  'depotDraft',
  'courtyardScored',
  'depot',
  'rear',
  'front2026',
  'front2025',
  'courtyard2024',
];

describe('archive search', () => {
  it('finds assessments by a few letters of an address, a gate label or a client name, across all three at once', async () => {
    expect(idsOf((await list(office, 'q=fennick')).items)).toEqual(ids('front2025', 'front2026', 'rear'));
    expect(idsOf((await list(office, 'q=courtY')).items)).toEqual(ids('courtyardScored', 'courtyard2024'));
    // "Harrowgate" is one client's name and another client's street.
    expect(idsOf((await list(office, 'q=harrowgate')).items)).toEqual(
      ids('front2025', 'front2026', 'rear', 'courtyardScored', 'courtyard2024'),
    );
    expect(idsOf((await list(office, 'q=EH4')).items)).toEqual(ids('front2025', 'front2026', 'rear'));
    expect((await list(office, 'q=%25')).items).toEqual([]);
  });

  it('filters by client, address, gate kind, usage class, status, verdict, ruleset version, auditor and visit dates', async () => {
    expect(idsOf((await list(office, 'client=quarry')).items)).toEqual(ids('depot', 'depotDraft'));
    expect(idsOf((await list(office, 'address=tollbar')).items)).toEqual(ids('depot', 'depotDraft'));
    expect(idsOf((await list(office, 'gateKind=slide')).items)).toEqual(ids('rear', 'depot', 'depotDraft'));
    expect(idsOf((await list(office, 'usageClass=2')).items)).toEqual(
      ids('courtyardScored', 'courtyard2024'),
    );
    expect(idsOf((await list(office, 'status=draft')).items)).toEqual(ids('depotDraft'));
    expect(idsOf((await list(office, 'family=north-american-gate&version=2015.1')).items)).toEqual(
      ids('front2025'),
    );
    expect(idsOf((await list(office, `auditorId=${org.auditor2.id}`)).items)).toEqual(ids('depot'));
    expect(idsOf((await list(office, 'from=2026-03-12&to=2026-06-15')).items)).toEqual(
      ids('front2026', 'rear', 'depot'),
    );
    const verdict = filed.rear!.verdict!;
    const withVerdict = Object.keys(filed).filter((k) => filed[k]!.verdict === verdict);
    expect(idsOf((await list(office, `verdict=${verdict}`)).items)).toEqual(ids(...withVerdict));
    // Filters combine.
    expect(idsOf((await list(office, 'gateKind=slide&status=signed&q=fennick')).items)).toEqual(ids('rear'));
  });

  it('describes each row with its client, site, gate, auditor, ruleset and signed PDF', async () => {
    const [row] = (await list(office, 'q=depot&status=signed')).items;
    expect(row).toMatchObject({
      id: filed.depot!.id,
      status: 'signed',
      client: { name: 'Quarry Lane Storage' },
      site: { addressLine1: '3 Tollbar Yard', city: 'Westmarch', usageClass: 3 },
      gate: { id: gates.depot, label: 'Depot main gate', kind: 'slide' },
      auditor: { id: org.auditor2.id },
      ruleset: { family: 'north-american-gate', version: '2026.1' },
      signedDocumentId: filed.depot!.documentId,
      date: '2026-06-15T13:00:00.000Z',
    });
  });

  it('pages forward and back with cursors without repeating or skipping a row', async () => {
    const forward: string[][] = [];
    let page = await list(office, 'limit=3');
    const cursors: (string | null)[] = [];
    for (;;) {
      forward.push(page.items.map((i) => i.id));
      cursors.push(page.prevCursor);
      if (!page.nextCursor) break;
      page = await list(office, `limit=3&after=${page.nextCursor}`);
    }
    expect(forward.flat()).toEqual(byDateDesc.map((k) => filed[k]!.id));
    expect(forward.map((p) => p.length)).toEqual([3, 3, 1]);
    expect(cursors[0]).toBeNull();
    // Back from the last page gives the same pages in reverse.
    const back = await list(office, `limit=3&before=${page.prevCursor}`);
    expect(back.items.map((i) => i.id)).toEqual(forward[1]);
    const first = await list(office, `limit=3&before=${back.prevCursor}`);
    expect(first.items.map((i) => i.id)).toEqual(forward[0]);
    expect(first.prevCursor).toBeNull();
  });

  it('sorts by client name and by gate label', async () => {
    const byClient = (await list(office, 'sort=client&limit=100')).items.map((i) => i.client.name);
    expect(byClient).toEqual([...byClient].sort((a, b) => a.localeCompare(b)));
    expect(byClient[0]).toBe('Harrowgate Lettings');
    const byGate = (await list(office, 'sort=-gate&limit=100')).items.map((i) => i.gate.label);
    expect(byGate[0]).toBe('Rear yard slider');
  });

  it('pages through a client-name or gate-label order with cursors, both ways, in the same order as one long page', async () => {
    for (const sort of ['client', '-gate']) {
      const whole = (await list(office, `sort=${sort}&limit=100`)).items.map((i) => i.id);
      expect(whole).toHaveLength(7);
      const pages: ArchivePage[] = [await list(office, `sort=${sort}&limit=2`)];
      while (pages.at(-1)!.nextCursor)
        pages.push(await list(office, `sort=${sort}&limit=2&after=${pages.at(-1)!.nextCursor}`));
      expect(
        pages.flatMap((p) => p.items.map((i) => i.id)),
        sort,
      ).toEqual(whole);
      const back = await list(office, `sort=${sort}&limit=2&before=${pages.at(-1)!.prevCursor}`);
      expect(
        back.items.map((i) => i.id),
        sort,
      ).toEqual(pages.at(-2)!.items.map((i) => i.id));
    }
  });

  it('refuses a cursor from another sort order and invalid filters, naming the field', async () => {
    const { nextCursor } = await list(office, 'limit=2');
    const wrongSort = await office.fetch(`/api/archive?sort=client&after=${nextCursor}`);
    expect(wrongSort.status).toBe(400);
    expect((await wrongSort.json()).errors[0].field).toBe('after');
    const bad = await office.fetch('/api/archive?verdict=fine&from=2026-13-01&limit=1000&colour=red');
    expect(bad.status).toBe(400);
    const fields = (await bad.json()).errors.map((e: { field: string }) => e.field).sort();
    expect(fields).toEqual(expect.arrayContaining(['verdict', 'from', 'limit']));
  });

  it('counts what a filter matches', async () => {
    expect(await expectJson(await office.fetch('/api/archive/count'))).toEqual({ total: 7 });
    expect(await expectJson(await office.fetch('/api/archive/count?q=harrowgate&status=signed'))).toEqual({
      total: 4,
    });
    expect(await expectJson(await office.fetch('/api/archive/count?gateKind=slide'))).toEqual({ total: 3 });
    expect(
      await expectJson(await office.fetch('/api/archive/count?status=signed&family=north-american-gate')),
    ).toEqual({ total: 5 });
  });

  it("never shows another organisation's assessments, whatever the filter", async () => {
    for (const query of ['limit=100', 'q=fennick', `gateId=${gates.depot}`, `auditorId=${org.auditor2.id}`]) {
      expect((await list(stranger, query)).items, query).toEqual([]);
    }
    expect((await stranger.fetch(`/api/archive/gates/${gates.depot}`)).status).toBe(404);
  });
});

describe('archive export', () => {
  it('streams a ZIP of the signed PDFs the filter matches, with an index.csv naming each file and its SHA-256', async () => {
    const res = await office.fetch('/api/archive/export?gateKind=slide');
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/zip');
    expect(res.headers.get('content-disposition')).toMatch(
      /^attachment; filename="latchwell-signed-reports-\d{4}-\d\d-\d\d\.zip"$/,
    );
    const entries = readZip(Buffer.from(await res.arrayBuffer()));
    const index = entries.get('index.csv')!.toString('utf8').trim().split('\r\n');
    expect(index[0]).toMatch(/^file,document_id,sha256,/);
    // The slide gates' signed reports only: not the draft, not the swing gates.
    expect(index).toHaveLength(3);
    for (const key of ['rear', 'depot']) {
      const line = index.find((l) => l.includes(filed[key]!.documentId!))!;
      expect(line).toContain(filed[key]!.pdfSha256!);
      const file = line.split(',')[0]!;
      expect(entries.get(file)?.equals(filed[key]!.pdf!)).toBe(true);
    }
    expect([...entries.keys()].filter((n) => n.endsWith('.pdf'))).toHaveLength(2);
    const audit = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'archive.exported' })
      .orderBy('id', 'desc')
      .first('detail');
    expect(audit.detail).toEqual({ filter: { gateKind: 'slide' } });
  });
});

describe('gate history', () => {
  it("lists every visit of a gate in order with verdicts and area scores, and the last visit's open findings", async () => {
    const history = await expectJson<GateHistory>(
      await office.fetch(`/api/archive/gates/${gates.frontDrive}`),
    );
    expect(history.gate).toMatchObject({
      label: 'Front drive swing',
      address: '14 Fennick Row',
      clientName: 'Harrowgate Lettings',
    });
    expect(history.visits.map((v) => v.assessmentId)).toEqual([filed.front2025!.id, filed.front2026!.id]);
    expect(history.visits.map((v) => v.ruleset.version)).toEqual(['2015.1', '2026.1']);
    expect(history.visits[1]!.verdict).toBe(filed.front2026!.verdict);
    expect(Object.keys(history.visits[1]!.areaScores ?? {})).toEqual(
      expect.arrayContaining(['pinch', 'gaps', 'force']),
    );
    expect(history.lastVisit?.assessmentId).toBe(filed.front2026!.id);

    const { result } = await testDb()('assessments').where({ id: filed.front2026!.id }).first('result');
    const open = result.findings
      .filter((f: { outcome: string }) => f.outcome === 'fail' || f.outcome === 'needs_info')
      .map((f: { ruleId: string }) => f.ruleId);
    expect(history.openFindings.map((f) => f.ruleId).sort()).toEqual(open.sort());
    const earlierFails: string[] = history.visits[0]!.failedRuleIds;
    for (const finding of history.openFindings.filter((f) => f.outcome === 'fail')) {
      expect(finding.visitsFailing, finding.ruleId).toBe(earlierFails.includes(finding.ruleId) ? 2 : 1);
    }
    // Signed 2026-03-12, the organisation's interval is 12 months.
    expect(history.reinspection).toMatchObject({
      dueOn: '2027-03-12',
      source: 'interval',
      lastSignedAssessmentId: filed.front2026!.id,
    });
  });

  it('shows the archive and gate history pages to the office', async () => {
    const page = await office.fetch('/archive?q=fennick');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Archive');
    const gatePage = await office.fetch(`/archive/gates/${gates.frontDrive}`);
    expect(gatePage.status).toBe(200);
    const html = await gatePage.text();
    expect(html).toContain('Front drive swing');
    expect(html).toContain('Mar 12, 2027');
  });
});
