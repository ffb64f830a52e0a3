/**
 * The audit trail's verification over HTTP. One event of this file's organisation is edited
 * with raw SQL (the append-only trigger switched off inside that one transaction, through the
 * owner role's connection: the app role can do neither) and verification must point at exactly that event; put back, the chain
 * verifies again. Other test files append events concurrently to the same chain, so the
 * assertions are about this organisation's events only; and since their own checks of the whole
 * chain would see the edit too, a row stays edited for one round of requests only.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AuditPage, TrailVerification } from '../../src/lib/server/audit-trail';
import {
  createOrganisation,
  fixturePassword,
  ownerTestDb,
  signIn,
  testDb,
  type FixtureOrganisation,
  type TestClient,
} from './support/fixtures';
import { expectJson } from './support/archive';

let org: FixtureOrganisation;
let owner: TestClient;
let otherOwner: TestClient;
let restore: (() => Promise<void>) | null = null;

/** Runs `sql` with the append-only trigger off, in one transaction (as the tables' owner): other sessions never see it off. */
async function withTriggerOff(sql: string, bindings: unknown[]): Promise<void> {
  await ownerTestDb().transaction(async (trx) => {
    await trx.raw('alter table audit_events disable trigger audit_events_append_only');
    await trx.raw(sql, bindings as never);
    await trx.raw('alter table audit_events enable trigger audit_events_append_only');
  });
}

beforeAll(async () => {
  org = await createOrganisation('audit');
  const other = await createOrganisation('audit-other');
  [owner, otherOwner] = await Promise.all([
    signIn(org.owner.email, fixturePassword),
    signIn(other.owner.email, fixturePassword),
  ]);
  // Three audited changes of our own, made the ordinary way.
  for (const remindClients of [true, false, true]) {
    const res = await owner.json('PATCH', '/api/organisation', { remindClients });
    expect(res.status).toBe(200);
  }
});

afterAll(async () => {
  await restore?.();
});

describe('audit trail', () => {
  it("lists the organisation's events newest first with who, what, which record and from where", async () => {
    const page = await expectJson<AuditPage>(await owner.fetch('/api/archive/audit?limit=2'));
    expect(page.items).toHaveLength(2);
    expect(page.items[0]!.id).toBeGreaterThan(page.items[1]!.id);
    expect(page.items[0]).toMatchObject({ actorLabel: org.owner.email, entityId: org.id });
    expect(page.nextBefore).toBe(page.items[1]!.id);
    const older = await expectJson<AuditPage>(
      await owner.fetch(`/api/archive/audit?before=${page.nextBefore}`),
    );
    expect(older.items.every((e) => e.id < page.nextBefore!)).toBe(true);
    expect((await owner.fetch('/api/archive/audit?limit=0')).status).toBe(400);
  });

  it('refuses an ordinary UPDATE of an event: the trail is append-only', async () => {
    const [{ id }] = await testDb()('audit_events')
      .where({ organisation_id: org.id })
      .orderBy('id')
      .limit(1)
      .select('id');
    // The app role holds no UPDATE on the trail at all; the tables' owner meets the trigger.
    await expect(testDb()('audit_events').where({ id }).update({ actor_label: 'nobody' })).rejects.toThrow(
      /permission denied/,
    );
    await expect(
      ownerTestDb()('audit_events').where({ id }).update({ actor_label: 'nobody' }),
    ).rejects.toThrow(/append-only/);
  });

  it('points at the edited event when one row is changed with raw SQL, and verifies again once it is put back', async () => {
    const intact = await expectJson<TrailVerification>(await owner.fetch('/api/archive/audit/verify'));
    expect(intact).toMatchObject({ ok: true, firstBrokenId: null });
    expect(intact.checked).toBeGreaterThanOrEqual(3);

    const events = await testDb()('audit_events')
      .where({ organisation_id: org.id })
      .orderBy('id')
      .select('id', 'actor_label');
    const target = events[1]!;
    restore = () =>
      withTriggerOff('update audit_events set actor_label = ? where id = ?', [target.actor_label, target.id]);
    // The chain is shared by every test file, so the row stays edited only for one round of requests.
    let broken: TrailVerification;
    let page: string;
    let elsewhere: TrailVerification;
    try {
      await withTriggerOff('update audit_events set actor_label = ? where id = ?', [
        'someone else',
        target.id,
      ]);
      [broken, page, elsewhere] = await Promise.all([
        owner.fetch('/api/archive/audit/verify').then((r) => expectJson<TrailVerification>(r)),
        owner.fetch('/archive/audit?verify=1').then((r) => r.text()),
        otherOwner.fetch('/api/archive/audit/verify').then((r) => expectJson<TrailVerification>(r)),
      ]);
    } finally {
      await restore();
      restore = null;
    }
    expect(broken).toMatchObject({ ok: false, firstBrokenId: Number(target.id), brokenBy: 'content' });
    expect(page).toContain(`Broken at event #${target.id}`);
    // Another organisation's owner is told only that something outside their events is broken.
    expect(elsewhere.ok).toBe(true);
    expect(elsewhere.firstBrokenId).toBeNull();
    expect(elsewhere.brokenElsewhere).toBeGreaterThanOrEqual(1);
    const again = await expectJson<TrailVerification>(await owner.fetch('/api/archive/audit/verify'));
    expect(again).toMatchObject({ ok: true, firstBrokenId: null });
  });

  it('points at the event after a removed one: its link to the previous hash is gone', async () => {
    // Append one more event, then remove the one before it, and put it back afterwards.
    expect((await owner.json('PATCH', '/api/organisation', { remindClients: false })).status).toBe(200);
    const [last, previous] = await testDb()('audit_events')
      .where({ organisation_id: org.id })
      .orderBy('id', 'desc')
      .limit(2)
      .select('*');
    const between = await testDb()('audit_events')
      .where('id', '>', previous.id)
      .andWhere('id', '<', last.id)
      .count({ n: '*' });
    if (Number(between[0]!.n) > 0) return; // another file's event sits between ours: the link test needs adjacent rows
    const saved = { ...previous };
    restore = () =>
      withTriggerOff(
        'insert into audit_events (id, organisation_id, actor_user_id, actor_label, action, entity_type, entity_id, ip, detail, created_at, prev_hash, hash) values (?,?,?,?,?,?,?,?,?,?,?,?)',
        [
          saved.id,
          saved.organisation_id,
          saved.actor_user_id,
          saved.actor_label,
          saved.action,
          saved.entity_type,
          saved.entity_id,
          saved.ip,
          JSON.stringify(saved.detail),
          saved.created_at,
          saved.prev_hash,
          saved.hash,
        ],
      );
    try {
      await withTriggerOff('delete from audit_events where id = ?', [previous.id]);
      const broken = await expectJson<TrailVerification>(await owner.fetch('/api/archive/audit/verify'));
      expect(broken).toMatchObject({ ok: false, firstBrokenId: Number(last.id), brokenBy: 'link' });
    } finally {
      await restore();
      restore = null;
    }
    expect((await expectJson<TrailVerification>(await owner.fetch('/api/archive/audit/verify'))).ok).toBe(
      true,
    );
  });
});
