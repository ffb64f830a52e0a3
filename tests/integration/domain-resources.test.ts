/**
 * Clients, sites and gates through HTTP: create, read, list (filter, sort, page), update,
 * delete, scoped to the caller's organisation and, for a homeowner, to their own client.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  createOrganisation,
  signIn,
  signInHomeowner,
  fixturePassword,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import {
  insertClient,
  insertDraft,
  insertGate,
  insertLocalVersion,
  insertSite,
  seedDirectory,
  type Directory,
} from './support/domain';

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let dir: Directory;
let owner: TestClient;
let office: TestClient;
let auditor: TestClient;
let homeowner: TestClient;
let otherOwner: TestClient;

beforeAll(async () => {
  [org, other] = await Promise.all([createOrganisation('domain'), createOrganisation('domain-other')]);
  dir = await seedDirectory(org);
  [owner, office, auditor, homeowner, otherOwner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
    signInHomeowner(org.homeowner.email),
    signIn(other.owner.email, fixturePassword),
  ]);
});

describe('clients', () => {
  it('creates a client and reads it back, with its location', async () => {
    const res = await office.json('POST', '/api/clients', {
      name: 'Hollowbrook Estates',
      kind: 'business',
      contactEmail: 'gates@hollowbrook.test',
      phone: '+1 555 0142',
    });
    expect(res.status).toBe(201);
    const created = await res.json();
    expect(created).toMatchObject({
      name: 'Hollowbrook Estates',
      kind: 'business',
      contactEmail: 'gates@hollowbrook.test',
      phone: '+1 555 0142',
      notes: null,
    });
    expect(res.headers.get('location')).toBe(`/api/clients/${created.id}`);
    const read = await owner.json('GET', `/api/clients/${created.id}`);
    expect(read.status).toBe(200);
    expect(await read.json()).toEqual(created);
  });

  it('updates only the fields sent, and null clears an optional one', async () => {
    const id = await insertClient(org.id, { phone: '555 0101', notes: 'Side gate code with the office' });
    const res = await auditor.json('PATCH', `/api/clients/${id}`, { phone: null, name: 'Renamed Lettings' });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({
      id,
      name: 'Renamed Lettings',
      phone: null,
      notes: 'Side gate code with the office',
    });
  });

  it('lists with free text, kind filter, sort and stable pages', async () => {
    const tag = `Zebedee${Date.now()}`;
    for (const n of ['C', 'A', 'B', 'E', 'D'])
      await insertClient(org.id, { name: `${tag} ${n}`, kind: 'business' });
    await insertClient(org.id, { name: `${tag} F`, kind: 'homeowner' });
    const first = await (
      await owner.json('GET', `/api/clients?q=${tag}&kind=business&sort=-name&pageSize=2`)
    ).json();
    expect(first.total).toBe(5);
    expect(first.items.map((c: { name: string }) => c.name)).toEqual([`${tag} E`, `${tag} D`]);
    const third = await (
      await owner.json('GET', `/api/clients?q=${tag}&kind=business&sort=-name&pageSize=2&page=3`)
    ).json();
    expect(third.items.map((c: { name: string }) => c.name)).toEqual([`${tag} A`]);
  });

  it('takes % and _ in the search text literally', async () => {
    await insertClient(org.id, { name: 'Percent 100% Gates' });
    const body = await (await owner.json('GET', `/api/clients?q=${encodeURIComponent('100%')}`)).json();
    expect(body.items.map((c: { name: string }) => c.name)).toEqual(['Percent 100% Gates']);
    const none = await (await owner.json('GET', `/api/clients?q=${encodeURIComponent('_ercent')}`)).json();
    expect(none.total).toBe(0);
  });

  it('shows a homeowner only their own client', async () => {
    const list = await (await homeowner.json('GET', '/api/clients')).json();
    expect(list.items.map((c: { id: string }) => c.id)).toEqual([org.clientId]);
    expect((await homeowner.json('GET', `/api/clients/${dir.clientId}`)).status).toBe(404);
    expect((await homeowner.json('GET', `/api/clients/${org.clientId}`)).status).toBe(200);
  });

  it("answers 404 for another organisation's client, whatever the method", async () => {
    for (const [method, body] of [['GET'], ['PATCH', { name: 'Taken over' }], ['DELETE']] as const) {
      const res = await otherOwner.json(method, `/api/clients/${dir.clientId}`, body);
      expect(res.status, method).toBe(404);
      expect(await res.text()).not.toContain(dir.clientId);
    }
    const stored = await testDb()('clients').where({ id: dir.clientId }).first('name');
    expect(stored.name).not.toBe('Taken over');
  });

  it('deletes a client with its sites and gates when nothing was assessed', async () => {
    const clientId = await insertClient(org.id);
    const siteId = await insertSite(org.id, clientId);
    const gateId = await insertGate(org.id, siteId);
    expect((await auditor.json('DELETE', `/api/clients/${clientId}`)).status).toBe(403);
    expect((await office.json('DELETE', `/api/clients/${clientId}`)).status).toBe(204);
    expect(await testDb()('gates').where({ id: gateId }).first()).toBeUndefined();
    expect(await testDb()('sites').where({ id: siteId }).first()).toBeUndefined();
    expect((await office.json('GET', `/api/clients/${clientId}`)).status).toBe(404);
  });

  it('refuses to delete a client, site or gate that has an assessment on record', async () => {
    const clientId = await insertClient(org.id);
    const siteId = await insertSite(org.id, clientId);
    const gateId = await insertGate(org.id, siteId);
    await insertDraft(org.id, gateId, org.auditor.id, await insertLocalVersion(org.id));
    for (const path of [`/api/clients/${clientId}`, `/api/sites/${siteId}`, `/api/gates/${gateId}`]) {
      const res = await owner.json('DELETE', path);
      expect(res.status, path).toBe(409);
      expect(res.headers.get('content-type')).toContain('application/problem+json');
      expect((await res.json()).detail).toMatch(/assessment/);
    }
    expect(await testDb()('gates').where({ id: gateId }).first('id')).toBeDefined();
  });

  it('refuses to delete a client a homeowner account belongs to', async () => {
    const res = await owner.json('DELETE', `/api/clients/${org.clientId}`);
    expect(res.status).toBe(409);
    expect((await res.json()).detail).toMatch(/account/);
  });
});

describe('sites', () => {
  it('creates a site for a client of the organisation only', async () => {
    const body = {
      clientId: dir.clientId,
      addressLine1: '7 Larkspur Row',
      city: 'Eastholm',
      region: 'CO',
      postalCode: '80998',
      country: 'us',
      usageClass: 3,
    };
    const res = await auditor.json('POST', '/api/sites', body);
    expect(res.status).toBe(201);
    expect(await res.json()).toMatchObject({
      ...body,
      country: 'US',
      clientName: expect.any(String),
      name: null,
    });
    const foreign = await otherOwner.json('POST', '/api/sites', { ...body, clientId: dir.clientId });
    expect(foreign.status).toBe(422);
    expect((await foreign.json()).errors).toEqual([
      { field: 'clientId', message: expect.stringMatching(/no such client/) },
    ]);
  });

  it('filters by client and usage class; a homeowner sees their own sites only', async () => {
    const byClient = await (
      await owner.json('GET', `/api/sites?clientId=${dir.clientId}&usageClass=2`)
    ).json();
    expect(byClient.items.map((s: { id: string }) => s.id)).toEqual([dir.siteId]);
    const mine = await (await homeowner.json('GET', '/api/sites')).json();
    expect(mine.items.map((s: { id: string }) => s.id)).toEqual([dir.homeSiteId]);
    expect((await homeowner.json('GET', `/api/sites/${dir.siteId}`)).status).toBe(404);
  });

  it('moves a site to another client of the organisation, never to a foreign one', async () => {
    const siteId = await insertSite(org.id, dir.clientId);
    const otherClient = await insertClient(other.id);
    const refused = await office.json('PATCH', `/api/sites/${siteId}`, { clientId: otherClient });
    expect(refused.status).toBe(422);
    const moved = await office.json('PATCH', `/api/sites/${siteId}`, {
      clientId: org.clientId,
      notes: 'Gate code 4411',
    });
    expect(moved.status).toBe(200);
    expect(await moved.json()).toMatchObject({ clientId: org.clientId, notes: 'Gate code 4411' });
  });
});

describe('gates', () => {
  it('stores dimensions in mm and kg and keeps the unit they were entered in', async () => {
    const res = await auditor.json('POST', '/api/gates', {
      siteId: dir.siteId,
      label: 'Service yard slider',
      kind: 'slide',
      leaves: 'single',
      width: { value: 12, unit: 'ft' },
      heightMm: 1830,
      weight: { value: 300, unit: 'lb' },
      operator: {
        listed: true,
        automaticClosing: true,
        manufacturedOn: '2021-03-01',
        mounting: 'pad',
        power: 'mains_ac',
        model: 'Slider 900',
      },
      installedOn: '2021-04-12',
      nextInspectionDue: '2027-04-12',
    });
    expect(res.status).toBe(201);
    const gate = await res.json();
    // 12 ft = 3657.6 mm; 300 lb = 136.08 kg (NIST SP 811 exact factors), stored whole.
    expect(gate).toMatchObject({
      widthMm: 3658,
      heightMm: 1830,
      weightKg: 136,
      installedOn: '2021-04-12',
      nextInspectionDue: '2027-04-12',
    });
    expect(gate.entered).toEqual({
      width: { value: 12, unit: 'ft' },
      height: { value: 1830, unit: 'mm' },
      weight: { value: 300, unit: 'lb' },
    });
    const patched = await (
      await office.json('PATCH', `/api/gates/${gate.id}`, {
        widthMm: null,
        height: { value: 6, unit: 'ft' },
        operator: { automaticClosing: false, model: null },
      })
    ).json();
    expect(patched).toMatchObject({ widthMm: null, heightMm: 1829, weightKg: 136 });
    // Operator facts merge: the ones not sent stay, null removes one.
    expect(patched.operator).toEqual({
      listed: true,
      automaticClosing: false,
      manufacturedOn: '2021-03-01',
      mounting: 'pad',
      power: 'mains_ac',
    });
    expect(patched.entered).toEqual({ height: { value: 6, unit: 'ft' }, weight: { value: 300, unit: 'lb' } });
  });

  it('refuses a dimension sent both ways, or out of bounds, naming the field', async () => {
    const gate = { siteId: dir.siteId, label: 'x', kind: 'swing', leaves: 'single' };
    const both = await owner.json('POST', '/api/gates', {
      ...gate,
      widthMm: 3000,
      width: { value: 10, unit: 'ft' },
    });
    expect(both.status).toBe(422);
    expect((await both.json()).errors).toEqual([
      { field: 'width', message: 'send either widthMm or width, not both' },
    ]);
    const stone = await owner.json('POST', '/api/gates', { ...gate, weight: { value: 2, unit: 'stone' } });
    expect((await stone.json()).errors).toEqual([
      { field: 'weight.unit', message: 'must be one of: kg, lb' },
    ]);
    const tooWide = await owner.json('POST', '/api/gates', {
      siteId: dir.siteId,
      label: 'x',
      kind: 'swing',
      leaves: 'single',
      width: { value: 300, unit: 'm' },
    });
    expect((await tooWide.json()).errors).toEqual([
      { field: 'width', message: expect.stringMatching(/between 100 and 60000 mm/) },
    ]);
  });

  it('lists by kind, site, client and inspection due date', async () => {
    const siteId = await insertSite(org.id, dir.clientId);
    const due = await insertGate(org.id, siteId, {
      kind: 'barrier_arm',
      leaves: 'single',
      opening_direction: null,
      next_inspection_due: '2026-01-15',
    });
    await insertGate(org.id, siteId, {
      kind: 'barrier_arm',
      leaves: 'single',
      opening_direction: null,
      next_inspection_due: '2027-06-01',
    });
    const body = await (
      await owner.json('GET', `/api/gates?siteId=${siteId}&kind=barrier_arm&dueBy=2026-12-31`)
    ).json();
    expect(body.items.map((g: { id: string }) => g.id)).toEqual([due]);
    const byClient = await (
      await owner.json('GET', `/api/gates?clientId=${dir.clientId}&sort=-nextInspectionDue&pageSize=100`)
    ).json();
    expect(byClient.items.every((g: { clientId: string }) => g.clientId === dir.clientId)).toBe(true);
  });

  it('shows a homeowner only the gates at their own sites', async () => {
    const mine = await (await homeowner.json('GET', '/api/gates')).json();
    expect(mine.items.map((g: { id: string }) => g.id)).toEqual([dir.homeGateId]);
    expect((await homeowner.json('GET', `/api/gates/${dir.gateId}`)).status).toBe(404);
    expect(
      (await homeowner.json('PATCH', `/api/gates/${dir.homeGateId}`, { label: 'Mine now' })).status,
    ).toBe(403);
  });

  it("never lists another organisation's rows", async () => {
    for (const path of ['/api/clients?pageSize=100', '/api/sites?pageSize=100', '/api/gates?pageSize=100']) {
      const text = await (await otherOwner.json('GET', path)).text();
      for (const id of Object.values(dir)) expect(text, path).not.toContain(id);
    }
  });
});
