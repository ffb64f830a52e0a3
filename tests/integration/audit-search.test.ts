/**
 * The audit trail's search and filters over HTTP: free text (with % and _ as plain letters),
 * event kind, person, a day range in the organisation's time zone (both ends included), one
 * record, and a gate with its assessments. Bad values are a 400 naming the parameter; another
 * organisation's events never show.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { recordAudit } from '@/lib/server/audit';
import type { AuditPage } from '@/lib/server/audit-trail';
import {
  createOrganisation,
  fixturePassword,
  saveOrganisationSettings,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { currentVersion, insertDraft, seedDirectory, type Directory } from './support/domain';

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let dir: Directory;
let owner: TestClient;
let office: TestClient;
let otherOwner: TestClient;
let assessmentId: string;
const today = new Date().toISOString().slice(0, 10);
const dayAfter = (iso: string, days: number) =>
  new Date(Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);

beforeAll(async () => {
  [org, other] = await Promise.all([
    createOrganisation('audit-search'),
    createOrganisation('audit-search-b'),
  ]);
  dir = await seedDirectory(org);
  const version = await currentVersion('north-american-gate');
  assessmentId = await insertDraft(org.id, dir.gateId, org.auditor.id, version.id);
  await testDb().transaction(async (trx) => {
    const event = (e: Parameters<typeof recordAudit>[1]) => recordAudit(trx, e);
    await event({
      organisationId: org.id,
      actorUserId: org.owner.id,
      actorLabel: org.owner.email,
      action: 'assessment.created',
      entityType: 'assessment',
      entityId: assessmentId,
      detail: { gateId: dir.gateId },
    });
    await event({
      organisationId: org.id,
      action: 'assessment.signed',
      entityType: 'assessment',
      entityId: assessmentId,
      detail: {},
    });
    await event({
      organisationId: org.id,
      actorUserId: org.office.id,
      actorLabel: org.office.email,
      action: 'gate.updated',
      entityType: 'gate',
      entityId: dir.homeGateId,
      detail: { note: 'hinge gap 50% wider' },
    });
    await event({
      organisationId: org.id,
      actorUserId: org.owner.id,
      actorLabel: org.owner.email,
      action: 'user.invited',
      entityType: 'user',
      entityId: null,
      detail: { email: 'newhire-audit@staff.test' },
    });
    await event({
      organisationId: other.id,
      actorUserId: other.owner.id,
      actorLabel: other.owner.email,
      action: 'user.invited',
      detail: { email: 'newhire-audit@other.test' },
    });
  });
  [owner, office, otherOwner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(other.owner.email, fixturePassword),
  ]);
});

async function search(client: TestClient, query: string): Promise<AuditPage['items']> {
  const res = await client.json('GET', `/api/archive/audit?${query}`);
  expect(res.status, await res.clone().text()).toBe(200);
  return ((await res.json()) as AuditPage).items;
}
const actions = (items: AuditPage['items']) => items.map((e) => e.action).sort();

describe('searching and filtering the audit trail', () => {
  it('finds text in the details, the person and the event kind; % and _ are plain letters', async () => {
    expect(actions(await search(owner, 'q=newhire-audit'))).toEqual(['user.invited']);
    // The office's own sign-in is an event of theirs too.
    const byOffice = await search(owner, `q=${encodeURIComponent(org.office.email)}`);
    expect(actions(byOffice).filter((a) => !a.startsWith('sign_in.'))).toEqual(['gate.updated']);
    expect(actions(await search(owner, `q=${encodeURIComponent('50% wider')}`))).toEqual(['gate.updated']);
    // As a wildcard, % would match "hinge gap 50% wider"; typed, it is a letter.
    expect(await search(owner, `q=${encodeURIComponent('hinge%wider')}`)).toEqual([]);
    expect(await search(owner, `q=${encodeURIComponent('hinge_gap')}`)).toEqual([]);
    expect(await search(owner, 'q=no_such_word_anywhere')).toEqual([]);
  });

  it('filters by event kind, by person, by record and by gate with its assessments', async () => {
    expect(actions(await search(owner, 'action=assessment.signed'))).toEqual(['assessment.signed']);
    const byOffice = await search(owner, `actor=${org.office.id}`);
    expect(byOffice.every((e) => e.actorUserId === org.office.id)).toBe(true);
    expect(actions(byOffice).filter((a) => !a.startsWith('sign_in.'))).toEqual(['gate.updated']);
    expect(actions(await search(owner, `entityId=${assessmentId}`))).toEqual([
      'assessment.created',
      'assessment.signed',
    ]);
    expect(actions(await search(owner, `gateId=${dir.gateId}`))).toEqual([
      'assessment.created',
      'assessment.signed',
    ]);
    expect(actions(await search(owner, `gateId=${dir.homeGateId}`))).toEqual(['gate.updated']);
    // Filters combine.
    expect(actions(await search(owner, `actor=${org.owner.id}&q=newhire`))).toEqual(['user.invited']);
  });

  it('takes a day range with both ends included, in the organisation time zone', async () => {
    const all = await search(owner, `from=${today}&to=${today}&q=newhire-audit`);
    expect(actions(all)).toEqual(['user.invited']);
    expect(await search(owner, `from=${dayAfter(today, 1)}`)).toEqual([]);
    expect(await search(owner, `to=${dayAfter(today, -1)}`)).toEqual([]);
    // 14 hours ahead of UTC, "today" may be tomorrow there: the day is the organisation's.
    await saveOrganisationSettings(owner, org.id, { timeZone: 'Pacific/Kiritimati' });
    try {
      const zoneToday = new Intl.DateTimeFormat('en-CA', { timeZone: 'Pacific/Kiritimati' }).format(
        new Date(),
      );
      expect(actions(await search(owner, `from=${zoneToday}&to=${zoneToday}&q=newhire-audit`))).toEqual([
        'user.invited',
      ]);
      expect(await search(owner, `from=${dayAfter(zoneToday, 1)}&q=newhire-audit`)).toEqual([]);
    } finally {
      await saveOrganisationSettings(owner, org.id, { timeZone: 'UTC' });
    }
  });

  it('refuses bad values with 400 and the parameter named', async () => {
    for (const [query, field] of [
      ['actor=not-a-uuid', 'actor'],
      ['gateId=1', 'gateId'],
      ['entityId=x', 'entityId'],
      ['from=2026-13-01', 'from'],
      ['from=2026-02-30', 'from'],
      ['to=yesterday', 'to'],
      [`from=${today}&to=${dayAfter(today, -1)}`, 'to'],
      ['action=DROP%20TABLE', 'action'],
      [`q=${'x'.repeat(101)}`, 'q'],
      ['limit=0', 'limit'],
      ['limit=201', 'limit'],
      ['colour=red', ''],
    ] as const) {
      const res = await owner.json('GET', `/api/archive/audit?${query}`);
      expect(res.status, query).toBe(400);
      expect(res.headers.get('content-type')).toMatch(/problem\+json/);
      const body = (await res.json()) as { errors: { field: string }[] };
      if (field)
        expect(
          body.errors.map((e) => e.field),
          query,
        ).toContain(field);
    }
  });

  it("never shows another organisation's events, and stays owner only", async () => {
    expect(actions(await search(otherOwner, 'q=newhire-audit'))).toEqual(['user.invited']);
    expect(await search(otherOwner, `gateId=${dir.gateId}`)).toEqual([]);
    expect(await search(otherOwner, `actor=${org.owner.id}`)).toEqual([]);
    expect((await office.json('GET', '/api/archive/audit?q=newhire')).status).toBe(403);
  });
});

describe('gates in the audit trail', () => {
  it('records a gate made over the API once (a replay adds nothing), with who made it', async () => {
    const key = crypto.randomUUID();
    const body = { siteId: dir.siteId, label: 'Audited side gate', kind: 'swing', leaves: 'single' };
    const made = await office.fetch('/api/gates', {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'idempotency-key': key },
      body: JSON.stringify(body),
    });
    expect(made.status, await made.clone().text()).toBe(201);
    const gate = (await made.json()) as { id: string };
    const replay = await office.fetch('/api/gates', {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'idempotency-key': key },
      body: JSON.stringify(body),
    });
    expect(replay.headers.get('idempotent-replayed')).toBe('true');
    const events = await search(owner, `gateId=${gate.id}`);
    expect(actions(events)).toEqual(['gate.created']);
    expect(events[0]).toMatchObject({ actorUserId: org.office.id, entityType: 'gate', entityId: gate.id });
    expect(actions(await search(owner, `q=${encodeURIComponent('Audited side gate')}`))).toEqual([
      'gate.created',
    ]);
    expect(await search(otherOwner, `gateId=${gate.id}`)).toEqual([]);
  });

  it("records a duplicated gate under the copy and in the original's history", async () => {
    const res = await office.json('POST', `/api/gates/${dir.gateId}/duplicate`, {
      label: 'Twin of the slider',
    });
    expect(res.status, await res.clone().text()).toBe(201);
    const copy = (await res.json()) as { id: string };
    const events = await search(owner, `gateId=${copy.id}`);
    expect(actions(events)).toEqual(['gate.duplicated']);
    expect(events[0]).toMatchObject({ actorUserId: org.office.id, entityId: copy.id });
    expect(events[0]!.detail).toMatchObject({ gateId: dir.gateId });
    expect(actions(await search(owner, `gateId=${dir.gateId}`))).toContain('gate.duplicated');
    expect(actions(await search(owner, 'action=gate.duplicated'))).toEqual(['gate.duplicated']);
  });
});

describe('clients and sites in the audit trail', () => {
  it('records a client and a site made over the API once each (a replay adds nothing), with who made them', async () => {
    const clientKey = crypto.randomUUID();
    const clientBody = { kind: 'homeowner', name: 'Audited Newcomer' };
    const madeClient = await office.fetch('/api/clients', {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'idempotency-key': clientKey },
      body: JSON.stringify(clientBody),
    });
    expect(madeClient.status, await madeClient.clone().text()).toBe(201);
    const client = (await madeClient.json()) as { id: string };
    const replay = await office.fetch('/api/clients', {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'idempotency-key': clientKey },
      body: JSON.stringify(clientBody),
    });
    expect(replay.headers.get('idempotent-replayed')).toBe('true');

    const madeSite = await office.json('POST', '/api/sites', {
      clientId: client.id,
      name: 'Audited yard',
      addressLine1: '4 Lantern Row',
      city: 'Brookvale',
      usageClass: 1,
    });
    expect(madeSite.status, await madeSite.clone().text()).toBe(201);
    const site = (await madeSite.json()) as { id: string };

    const clients = await search(owner, 'action=client.created');
    expect(clients.filter((e) => e.entityId === client.id)).toHaveLength(1);
    expect(clients.find((e) => e.entityId === client.id)).toMatchObject({
      actorUserId: org.office.id,
      entityType: 'client',
    });
    const sites = await search(owner, `q=${encodeURIComponent('Audited yard')}`);
    expect(actions(sites)).toEqual(['site.created']);
    expect(sites[0]).toMatchObject({ actorUserId: org.office.id, entityType: 'site', entityId: site.id });
    expect(await search(otherOwner, 'action=client.created')).toEqual([]);
  });
});
