import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  anonymousClient,
  caughtMailIds,
  closeTestDb,
  createOrganisation,
  fixturePassword,
  linkIn,
  signIn,
  signInHomeowner,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';

let org: FixtureOrganisation;
let owner: TestClient;
let office: TestClient;
let auditor: TestClient;
beforeAll(async () => {
  org = await createOrganisation('staff');
  [owner, office, auditor] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(org.office.email, fixturePassword),
    signIn(org.auditor.email, fixturePassword),
  ]);
});
afterAll(async () => {
  await closeTestDb();
});

const newAddress = () => `invitee-${Date.now()}-${Math.floor(Math.random() * 1e6)}@fixtures.test`;

/** Invites `email` as `role` and returns the link from the caught e-mail. */
async function invite(email: string, role: string): Promise<string> {
  const seen = await caughtMailIds(email);
  const res = await owner.json('POST', '/api/invitations', { email, role });
  expect(res.status).toBe(201);
  const mail = await waitForMail(email, seen);
  expect(mail.subject).toContain(org.name);
  return linkIn(mail.text, '/invite/');
}

describe('invitations', () => {
  it('take an invitee from e-mail to a signed-in staff member with the invited role', async () => {
    const email = newAddress();
    const link = await invite(email, 'office');
    const token = new URL(link).pathname.split('/').pop() ?? '';

    const page = await anonymousClient().fetch(new URL(link).pathname);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain(org.name);
    expect(html).toContain(email);

    const accepted = await anonymousClient().json('POST', `/api/invitations/${token}/accept`, {
      name: 'Rowan Tessaly',
      password: 'a-long-enough-pass',
    });
    expect(accepted.status).toBe(201);
    const created = await accepted.json();
    expect(created.role).toBe('office');

    const invitee = await signIn(email, 'a-long-enough-pass');
    expect((await invitee.json('GET', '/api/users')).status).toBe(200); // office may list people
    const me = await (await owner.json('GET', `/api/users/${created.id}`)).json();
    expect(me).toMatchObject({ email, name: 'Rowan Tessaly', role: 'office', active: true });

    const actions = (
      await testDb()('audit_events')
        .where({ organisation_id: org.id })
        .whereIn('action', ['invitation.created', 'invitation.accepted'])
        .select('action', 'detail')
    ).filter((e) => e.detail.email === email || e.detail.role === 'office');
    expect(actions.map((e) => e.action).sort()).toEqual(['invitation.accepted', 'invitation.created']);
  });

  it('accept a link once only', async () => {
    const email = newAddress();
    const token = new URL(await invite(email, 'auditor')).pathname.split('/').pop();
    expect(
      (
        await anonymousClient().json('POST', `/api/invitations/${token}/accept`, {
          name: 'First Try',
          password: 'first-password-1',
        })
      ).status,
    ).toBe(201);
    const again = await anonymousClient().json('POST', `/api/invitations/${token}/accept`, {
      name: 'Second Try',
      password: 'second-password-2',
    });
    expect(again.status).toBe(404);
    const rows = await testDb()('users').whereRaw('email = ?::citext', [email]).select('name');
    expect(rows).toEqual([{ name: 'First Try' }]);
  });

  it('refuse an expired or withdrawn link', async () => {
    const expiredEmail = newAddress();
    const expiredToken = new URL(await invite(expiredEmail, 'auditor')).pathname.split('/').pop();
    await testDb()('invitations')
      .whereRaw('email = ?::citext', [expiredEmail])
      .update({ expires_at: new Date(Date.now() - 1000) });
    expect(
      (
        await anonymousClient().json('POST', `/api/invitations/${expiredToken}/accept`, {
          name: 'Late',
          password: 'late-password-1',
        })
      ).status,
    ).toBe(404);
    expect((await anonymousClient().fetch(`/invite/${expiredToken}`)).status).toBe(404);

    const withdrawnEmail = newAddress();
    const withdrawnToken = new URL(await invite(withdrawnEmail, 'auditor')).pathname.split('/').pop();
    const open = (await (await owner.json('GET', '/api/invitations')).json()).items.find(
      (i: { email: string }) => i.email === withdrawnEmail,
    );
    expect((await owner.json('DELETE', `/api/invitations/${open.id}`)).status).toBe(204);
    expect(
      (
        await anonymousClient().json('POST', `/api/invitations/${withdrawnToken}/accept`, {
          name: 'Gone',
          password: 'gone-password-1',
        })
      ).status,
    ).toBe(404);
  });

  it('refuse an address that already has an account', async () => {
    const res = await owner.json('POST', '/api/invitations', { email: org.auditor.email, role: 'office' });
    expect(res.status).toBe(409);
  });

  it('are for the owner only', async () => {
    expect(
      (await office.json('POST', '/api/invitations', { email: newAddress(), role: 'auditor' })).status,
    ).toBe(403);
    expect(
      (await auditor.json('POST', '/api/invitations', { email: newAddress(), role: 'auditor' })).status,
    ).toBe(403);
  });

  it('reject unknown fields, naming them, and a homeowner role', async () => {
    const res = await owner.json('POST', '/api/invitations', {
      email: newAddress(),
      role: 'auditor',
      isAdmin: true,
    });
    expect(res.status).toBe(422);
    expect((await res.json()).errors.map((e: { field: string }) => e.field)).toContain('isAdmin');
    const homeowner = await owner.json('POST', '/api/invitations', {
      email: newAddress(),
      role: 'homeowner',
    });
    expect(homeowner.status).toBe(422);
    expect((await homeowner.json()).errors[0].field).toBe('role');
  });

  it('ask for a password of at least 10 characters', async () => {
    const token = new URL(await invite(newAddress(), 'auditor')).pathname.split('/').pop();
    const res = await anonymousClient().json('POST', `/api/invitations/${token}/accept`, {
      name: 'Short',
      password: 'short',
    });
    expect(res.status).toBe(422);
    expect((await res.json()).errors[0].field).toBe('password');
  });
});

describe('the people API', () => {
  it('lists the organisation filtered by role and active, sorted and paged', async () => {
    const res = await office.json('GET', '/api/users?role=auditor&active=true&sort=-email&pageSize=1&page=2');
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.total).toBeGreaterThanOrEqual(2);
    expect(body.items).toHaveLength(1);
    expect(body.items[0].role).toBe('auditor');
    const all = (
      await (await office.json('GET', '/api/users?role=auditor&active=true&sort=-email')).json()
    ).items.map((u: { email: string }) => u.email);
    expect(all).toEqual([...all].sort().reverse());
    expect(body.items[0].email).toBe(all[1]);
  });

  it('keeps the people list from auditors and homeowners', async () => {
    expect((await auditor.json('GET', '/api/users')).status).toBe(403);
    const homeowner = await signInHomeowner(org.homeowner.email);
    expect((await homeowner.json('GET', '/api/users')).status).toBe(403);
    expect((await homeowner.json('GET', '/api/organisation')).status).toBe(403);
  });

  it('rejects a bad query parameter naming it', async () => {
    const res = await office.json('GET', '/api/users?role=wizard');
    expect(res.status).toBe(400);
    expect((await res.json()).errors[0].field).toBe('role');
  });

  it('lets only the owner change people', async () => {
    const res = await office.json('PATCH', `/api/users/${org.auditor2.id}`, { active: false });
    expect(res.status).toBe(403);
    const row = await testDb()('users').where({ id: org.auditor2.id }).first('active');
    expect(row.active).toBe(true);
  });

  it('rejects unknown fields in a change, naming them', async () => {
    const res = await owner.json('PATCH', `/api/users/${org.auditor2.id}`, {
      name: 'New Name',
      passwordHash: 'x',
    });
    expect(res.status).toBe(422);
    expect((await res.json()).errors.map((e: { field: string }) => e.field)).toContain('passwordHash');
  });

  it('keeps at least one active owner', async () => {
    const res = await owner.json('PATCH', `/api/users/${org.owner.id}`, { role: 'office' });
    expect(res.status).toBe(409);
    const row = await testDb()('users').where({ id: org.owner.id }).first('role');
    expect(row.role).toBe('owner');
  });

  it('records role changes and deactivations in the audit trail', async () => {
    const fresh = await createOrganisation('audit-roles');
    const freshOwner = await signIn(fresh.owner.email, fixturePassword);
    await freshOwner.json('PATCH', `/api/users/${fresh.auditor.id}`, { role: 'office' });
    await freshOwner.json('PATCH', `/api/users/${fresh.auditor2.id}`, { active: false });
    const events = await testDb()('audit_events')
      .where({ organisation_id: fresh.id })
      .whereIn('action', ['user.role_changed', 'user.deactivated'])
      .orderBy('id')
      .select('action', 'entity_id', 'actor_user_id', 'detail');
    expect(events).toEqual([
      {
        action: 'user.role_changed',
        entity_id: fresh.auditor.id,
        actor_user_id: fresh.owner.id,
        detail: { email: fresh.auditor.email, from: 'auditor', to: 'office' },
      },
      {
        action: 'user.deactivated',
        entity_id: fresh.auditor2.id,
        actor_user_id: fresh.owner.id,
        detail: { email: fresh.auditor2.email },
      },
    ]);
  });

  it('refuses a staff role for a homeowner', async () => {
    const res = await owner.json('PATCH', `/api/users/${org.homeowner.id}`, { role: 'office' });
    expect(res.status).toBe(422);
  });
});

describe('organisation settings', () => {
  it('are readable by staff and changeable by the owner only', async () => {
    const read = await auditor.json('GET', '/api/organisation');
    expect(read.status).toBe(200);
    expect(await read.json()).toMatchObject({ id: org.id, displayUnits: 'metric', timeZone: 'UTC' });
    expect((await office.json('PATCH', '/api/organisation', { displayUnits: 'imperial' })).status).toBe(403);
    const changed = await owner.json('PATCH', '/api/organisation', {
      displayUnits: 'imperial',
      timeZone: 'America/Denver',
      remindClients: true,
    });
    expect(changed.status).toBe(200);
    expect(await changed.json()).toMatchObject({
      displayUnits: 'imperial',
      timeZone: 'America/Denver',
      remindClients: true,
    });
    const event = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'organisation.settings_changed' })
      .orderBy('id', 'desc')
      .first('detail');
    expect(event.detail.timeZone).toEqual({ from: 'UTC', to: 'America/Denver' });
  });

  it('reject an unknown time zone and an interval out of range, naming each field', async () => {
    const res = await owner.json('PATCH', '/api/organisation', {
      timeZone: 'Mars/Olympus',
      reinspectionMonths: 0,
    });
    expect(res.status).toBe(422);
    const fields = (await res.json()).errors.map((e: { field: string }) => e.field).sort();
    expect(fields).toEqual(['reinspectionMonths', 'timeZone']);
  });
});

describe('the owner pages', () => {
  it('show staff and settings to the owner and refuse others', async () => {
    const staffPage = await owner.fetch('/staff');
    expect(staffPage.status).toBe(200);
    const html = await staffPage.text();
    expect(html).toContain(org.office.email);
    expect(html).toContain('Send invitation');
    expect((await office.fetch('/staff')).status).toBe(403);
    expect((await owner.fetch('/settings')).status).toBe(200);
    expect((await auditor.fetch('/settings')).status).toBe(403);
  });

  it('invite through the staff page form', async () => {
    const email = newAddress();
    const seen = await caughtMailIds(email);
    const res = await owner.fetch('/staff', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ intent: 'invite', email, role: 'auditor' }),
    });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/staff?done=invited');
    const mail = await waitForMail(email, seen);
    const link = linkIn(mail.text, '/invite/');
    const form = await anonymousClient().fetch(new URL(link).pathname, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({
        name: 'Page Invitee',
        password: 'page-invitee-pass',
        confirm: 'page-invitee-pass',
      }),
    });
    expect(form.status).toBe(303);
    expect(form.headers.get('location')).toBe('/signin?invited');
    await signIn(email, 'page-invitee-pass');
  });

  it('save settings through the settings form and show field errors', async () => {
    const bad = await owner.fetch('/settings', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({
        name: org.name,
        displayUnits: 'metric',
        timeZone: 'Nowhere/Special',
        reinspectionMonths: '12',
      }),
    });
    expect(bad.status).toBe(422);
    expect(await bad.text()).toContain('Time zone must be a time zone name');
    const good = await owner.fetch('/settings', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({
        name: org.name,
        displayUnits: 'metric',
        timeZone: 'Europe/Dublin',
        reinspectionMonths: '24',
        remindClients: 'on',
      }),
    });
    expect(good.status).toBe(303);
    const row = await testDb()('organisations')
      .where({ id: org.id })
      .first('time_zone', 'reinspection_months', 'remind_clients');
    expect(row).toEqual({ time_zone: 'Europe/Dublin', reinspection_months: 24, remind_clients: true });
  });
});
