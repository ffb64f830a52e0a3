/**
 * The caught-mail pages (the development mail catcher seen through the app) show an
 * organisation's owner only the mail that organisation sent to its own people: two
 * organisations on one server each see their own homeowner's sign-in link and signed-report
 * mail, never the other's, not even by guessing a message id or naming the other's homeowner as
 * one of their own client contacts.
 */
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { serverStorage } from './support/archive';
import { queueOutboxMessage } from './support/outbox';
import {
  createOrganisation,
  fixturePassword,
  requestHomeownerLink,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';

interface Summary {
  id: string;
  to: string[];
  subject: string;
  attachments: unknown[];
}

let a: FixtureOrganisation;
let b: FixtureOrganisation;
let ownerA: TestClient;
let ownerB: TestClient;
/** B's sign-in link mail and B's mail with a PDF attached. */
let bLink: Summary;
let bReport: Summary;
let aLink: Summary;
const pdf = Buffer.from(`%PDF-1.7\n% caught-mail tenancy ${Date.now()}\n%%EOF\n`);

async function caught(to: string, match: (m: Summary) => boolean = () => true): Promise<Summary> {
  const deadline = Date.now() + 15_000;
  for (;;) {
    const list = (await (await fetch(`${inject('catcherUrl')}/messages`)).json()) as Summary[];
    const found = list.find((m) => m.to.includes(to) && match(m));
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no mail to ${to} was caught`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

beforeAll(async () => {
  [a, b] = await Promise.all([createOrganisation('tenancy-a'), createOrganisation('tenancy-b')]);
  [ownerA, ownerB] = await Promise.all([
    signIn(a.owner.email, fixturePassword),
    signIn(b.owner.email, fixturePassword),
  ]);
  await requestHomeownerLink(a.homeowner.email);
  await requestHomeownerLink(b.homeowner.email);
  aLink = await caught(a.homeowner.email);
  bLink = await caught(b.homeowner.email);
  // A signed report mailed by B's outbox, as the signing flow queues it.
  const stored = await serverStorage().put(pdf, 'application/pdf');
  await queueOutboxMessage(testDb(), {
    organisation_id: b.id,
    kind: 'signed_report',
    to_addresses: [b.homeowner.email],
    subject: 'Your signed gate safety report (tenancy test)',
    text_body: 'Your signed report is attached.',
    attachments: [{ filename: 'signed-report.pdf', contentType: 'application/pdf', storageKey: stored.key }],
  });
  bReport = await caught(b.homeowner.email, (m) => m.attachments.length === 1);
});

describe('caught mail', () => {
  it("lists an owner's own organisation's mail only", async () => {
    const pageA = await (await ownerA.fetch('/mail')).text();
    expect(pageA).toContain(`/mail/${aLink.id}`);
    expect(pageA).toContain(a.homeowner.email);
    expect(pageA).not.toContain(bLink.id);
    expect(pageA).not.toContain(bReport.id);
    expect(pageA).not.toContain(b.homeowner.email);

    const pageB = await (await ownerB.fetch('/mail')).text();
    expect(pageB).toContain(`/mail/${bLink.id}`);
    expect(pageB).toContain(`/mail/${bReport.id}`);
    expect(pageB).not.toContain(aLink.id);
    expect(pageB).not.toContain(a.homeowner.email);
  });

  it("refuses another organisation's message and attachment by id", async () => {
    for (const path of [`/mail/${bLink.id}`, `/mail/${bReport.id}`, `/mail/${bReport.id}/attachments/0`]) {
      const res = await ownerA.fetch(path);
      expect(res.status, path).toBe(404);
      expect(await res.text()).not.toContain('/signin/link?token=');
    }
    const own = await ownerB.fetch(`/mail/${bLink.id}`);
    expect(own.status).toBe(200);
    expect(await own.text()).toContain('/signin/link?token=');
    const attachment = await ownerB.fetch(`/mail/${bReport.id}/attachments/0`);
    expect(attachment.status).toBe(200);
    expect(Buffer.from(await attachment.arrayBuffer()).equals(pdf)).toBe(true);
  });

  it("does not open another organisation's mail to an owner who adds that address as a client contact", async () => {
    await testDb()('clients').insert({
      organisation_id: a.id,
      name: 'Borrowed contact',
      kind: 'homeowner',
      contact_email: b.homeowner.email,
    });
    expect(await (await ownerA.fetch('/mail')).text()).not.toContain(bLink.id);
    expect((await ownerA.fetch(`/mail/${bLink.id}`)).status).toBe(404);
    expect((await ownerA.fetch(`/mail/${bReport.id}/attachments/0`)).status).toBe(404);
  });
});
