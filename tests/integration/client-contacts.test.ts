/**
 * Correcting a client's contact details over HTTP, and choosing who receives the signing link:
 * the homeowner account follows a corrected e-mail (audited, its sessions end, the old address
 * can no longer sign in), other organisations' clients stay out of reach, bad input is refused
 * naming the field, and the signing link goes only to the recipient the office chose.
 */
import { beforeAll, describe, expect, inject, it } from 'vitest';
import {
  anonymousClient,
  caughtMailIds,
  createOrganisation,
  fixturePassword,
  followHomeownerLink,
  hasSession,
  linkIn,
  requestHomeownerLink,
  signIn,
  signInHomeowner,
  testDb,
  waitForMail,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { seedScoredAssessment } from './support/signing-seed';

let org: FixtureOrganisation;
let other: FixtureOrganisation;
let office: TestClient;

beforeAll(async () => {
  [org, other] = await Promise.all([createOrganisation('contacts'), createOrganisation('contacts-other')]);
  office = await signIn(org.office.email, fixturePassword);
});

async function clientRow(id: string) {
  return testDb()('clients').where({ id }).first('name', 'contact_email', 'phone', 'updated_at');
}

describe('correcting a client', () => {
  it('moves the homeowner account to the corrected e-mail, ends its sessions, and the old address can no longer sign in', async () => {
    const oldEmail = org.homeowner.email;
    const newEmail = `fixed.${oldEmail}`;
    const session = await signInHomeowner(oldEmail);
    expect((await session.fetch(`/api/clients/${org.clientId}`)).status).toBe(200);
    const pendingLink = await requestHomeownerLink(oldEmail);
    const before = await testDb()('users').where({ id: org.homeowner.id }).first('session_version');

    const res = await office.json('PATCH', `/api/clients/${org.clientId}`, {
      contactEmail: newEmail,
      phone: '+1 555 0100',
      name: 'Household corrected',
    });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ contactEmail: newEmail, phone: '+1 555 0100', name: 'Household corrected' });

    const account = await testDb()('users').where({ id: org.homeowner.id }).first('email', 'session_version');
    expect(account.email).toBe(newEmail);
    expect(account.session_version).toBe(before.session_version + 1);
    const events = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'user.email_changed', entity_id: org.homeowner.id })
      .select('detail', 'actor_user_id');
    expect(events).toHaveLength(1);
    expect(events[0].actor_user_id).toBe(org.office.id);
    expect(events[0].detail).toMatchObject({ from: oldEmail, to: newEmail, clientId: org.clientId });
    const clientEvent = await testDb()('audit_events')
      .where({ organisation_id: org.id, action: 'client.updated', entity_id: org.clientId })
      .first('detail');
    expect(clientEvent.detail.contactEmail).toEqual({ from: oldEmail, to: newEmail });

    // The session opened under the old address is over.
    expect((await session.fetch(`/api/clients/${org.clientId}`)).status).toBe(401);
    // A link mailed to the old address before the correction no longer signs anyone in.
    const followed = await followHomeownerLink(pendingLink);
    expect(hasSession(followed.client)).toBe(false);
    // Asking for a link with the old address sends nothing (same 202, no account behind it).
    const linksBefore = await testDb()('sign_in_links')
      .where({ user_id: org.homeowner.id })
      .count<{ count: string }[]>({ count: '*' });
    const oldSeen = await caughtMailIds(oldEmail);
    expect((await anonymousClient().json('POST', '/api/auth/email-link', { email: oldEmail })).status).toBe(
      202,
    );
    await new Promise((r) => setTimeout(r, 1500));
    expect(await caughtMailIds(oldEmail)).toEqual(oldSeen);
    const linksAfter = await testDb()('sign_in_links')
      .where({ user_id: org.homeowner.id })
      .count<{ count: string }[]>({ count: '*' });
    expect(linksAfter[0].count).toBe(linksBefore[0].count);
    // The corrected address signs in to the same account.
    const fresh = await signInHomeowner(newEmail);
    expect((await fresh.fetch(`/api/clients/${org.clientId}`)).status).toBe(200);
  });

  it('refuses an address that another sign-in account uses, changing nothing', async () => {
    const victim = await createOrganisation('contacts-conflict');
    const before = await clientRow(victim.clientId);
    const owner = await signIn(victim.owner.email, fixturePassword);
    const res = await owner.json('PATCH', `/api/clients/${victim.clientId}`, {
      contactEmail: victim.office.email.toUpperCase(),
      phone: '555 0199',
    });
    expect(res.status).toBe(409);
    expect((await res.json()).errors).toEqual([expect.objectContaining({ field: 'contactEmail' })]);
    expect(await clientRow(victim.clientId)).toEqual(before);
    expect((await testDb()('users').where({ id: victim.homeowner.id }).first('email')).email).toBe(
      victim.homeowner.email,
    );
  });

  it("answers 404 for another organisation's client and changes nothing", async () => {
    const before = await clientRow(other.clientId);
    const res = await office.json('PATCH', `/api/clients/${other.clientId}`, {
      contactEmail: `taken.${other.homeowner.email}`,
    });
    expect(res.status).toBe(404);
    expect(await clientRow(other.clientId)).toEqual(before);
    expect((await testDb()('users').where({ id: other.homeowner.id }).first('email')).email).toBe(
      other.homeowner.email,
    );
  });

  it('refuses a malformed e-mail with 422 naming the field, changing nothing', async () => {
    const before = await clientRow(org.clientId);
    const res = await office.json('PATCH', `/api/clients/${org.clientId}`, {
      contactEmail: 'home at example',
      name: 'Changed name',
    });
    expect(res.status).toBe(422);
    expect(res.headers.get('content-type')).toContain('application/problem+json');
    expect((await res.json()).errors).toEqual([expect.objectContaining({ field: 'contactEmail' })]);
    expect(await clientRow(org.clientId)).toEqual(before);
  });
});

describe('correcting a site or a gate', () => {
  async function eventsFor(action: string, entityId: string) {
    return testDb()('audit_events')
      .where({ organisation_id: org.id, action, entity_id: entityId })
      .select('detail', 'actor_user_id');
  }

  it('records each changed column with its old and new value, and nothing for a patch that changes nothing', async () => {
    const site = await office.json('POST', '/api/sites', {
      clientId: org.clientId,
      addressLine1: '12 Quarry Lane',
      city: 'Millbrook',
      usageClass: 1,
    });
    expect(site.status).toBe(201);
    const siteId = (await site.json()).id as string;
    const gate = await office.json('POST', '/api/gates', {
      siteId,
      label: 'Front swing',
      kind: 'swing',
      leaves: 'double',
      widthMm: 1800,
    });
    expect(gate.status).toBe(201);
    const gateId = (await gate.json()).id as string;

    const fixed = await office.json('PATCH', `/api/sites/${siteId}`, {
      addressLine1: '21 Quarry Lane',
      city: 'Millbrook',
    });
    expect(fixed.status).toBe(200);
    const siteEvents = await eventsFor('site.updated', siteId);
    expect(siteEvents).toHaveLength(1);
    expect(siteEvents[0].actor_user_id).toBe(org.office.id);
    // The unchanged city is not listed.
    expect(siteEvents[0].detail.changes).toEqual({
      address_line1: { from: '12 Quarry Lane', to: '21 Quarry Lane' },
    });

    expect((await office.json('PATCH', `/api/gates/${gateId}`, { widthMm: 2400 })).status).toBe(200);
    const gateEvents = await eventsFor('gate.updated', gateId);
    expect(gateEvents).toHaveLength(1);
    expect(gateEvents[0].detail.changes.width_mm).toEqual({ from: 1800, to: 2400 });

    expect((await office.json('PATCH', `/api/gates/${gateId}`, { widthMm: 2400 })).status).toBe(200);
    expect(await eventsFor('gate.updated', gateId)).toHaveLength(1);

    const owner = await signIn(org.owner.email, fixturePassword);
    expect((await owner.fetch(`/api/sites/${siteId}`, { method: 'DELETE' })).status).toBe(204);
    const deleted = await eventsFor('site.deleted', siteId);
    expect(deleted).toHaveLength(1);
    expect(deleted[0].detail.site).toMatchObject({ address_line1: '21 Quarry Lane' });
    expect(deleted[0].detail.gatesDeleted).toEqual([{ id: gateId, label: 'Front swing' }]);
  });
});

describe('choosing who receives the signing link', () => {
  it('sends the link only to the chosen recipient, stores it on the sign request and audits it', async () => {
    const target = await createOrganisation('contacts-sign');
    const staff = await signIn(target.office.email, fixturePassword);
    const contact = (await clientRow(target.clientId)).contact_email as string;
    const seeded = await seedScoredAssessment(
      testDb(),
      { id: target.id, auditorId: target.auditor.id, clientId: target.clientId },
      { dataDir: inject('dataDir') },
    );
    const chosen = `manager.${target.slug}@fixtures.test`;

    const bad = await staff.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {
      recipient: 'manager@',
    });
    expect(bad.status).toBe(422);
    expect((await bad.json()).errors).toEqual([expect.objectContaining({ field: 'recipient' })]);
    expect(
      await testDb()('sign_requests')
        .where({ assessment_id: seeded.assessmentId })
        .count<{ count: string }[]>({ count: '*' }),
    ).toEqual([{ count: '0' }]);

    const contactSeen = await caughtMailIds(contact);
    const chosenSeen = await caughtMailIds(chosen);
    const res = await staff.json('POST', `/api/assessments/${seeded.assessmentId}/send-for-signature`, {
      recipient: `  ${chosen}  `,
    });
    expect(res.status).toBe(202);
    const body = await res.json();
    expect(body.signRequest.recipient).toBe(chosen);

    const mail = await waitForMail(chosen, chosenSeen, 20_000);
    const link = new URL(linkIn(mail.text, '/sign/'));
    expect((await anonymousClient().fetch(link.pathname)).status).toBe(200);
    const stored = await testDb()('sign_requests')
      .where({ id: body.signRequest.id })
      .first('recipient_email');
    expect(stored.recipient_email).toBe(chosen);
    const event = await testDb()('audit_events')
      .where({
        organisation_id: target.id,
        action: 'assessment.sent_for_signature',
        entity_id: seeded.assessmentId,
      })
      .first('detail');
    expect(event.detail).toMatchObject({
      recipient: chosen,
      recipientChosen: true,
      clientContactEmail: contact,
    });
    // The client's own contact address got nothing.
    expect(await caughtMailIds(contact)).toEqual(contactSeen);
  });
});
