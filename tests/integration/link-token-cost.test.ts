/**
 * A password reset or an invitation accept with a dead or made-up token must cost one indexed
 * read, never an argon2 hash: anyone can post such tokens without signing in, and hashing first
 * would let them make the server spend a deliberately slow hash per request. Counts the hashes the
 * modules ask for (the hashing itself runs for real) against the real test database.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, inject, it, vi } from 'vitest';
import { newLinkToken, hashLinkToken } from '../../src/lib/server/auth/tokens';
import { createOrganisation, fixturePassword, testDb, type FixtureOrganisation } from './support/fixtures';

const hashes = vi.hoisted(() => ({ count: 0 }));
vi.mock('../../src/lib/server/passwords', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../src/lib/server/passwords')>();
  return {
    ...real,
    hashPassword: (password: string) => {
      hashes.count++;
      return real.hashPassword(password);
    },
  };
});

process.env.DATABASE_URL = inject('databaseUrl');
const { resetPassword } = await import('../../src/lib/server/auth/password-reset');
const { acceptInvitation } = await import('../../src/lib/server/invitations');
const { closeDatabase } = await import('../../src/lib/server/db');

let org: FixtureOrganisation;
const newPassword = `${fixturePassword}-renewed`;

beforeAll(async () => {
  org = await createOrganisation('link-cost');
});

afterAll(async () => {
  await closeDatabase();
});

async function resetLink(minutesLeft: number, used = false): Promise<string> {
  const token = newLinkToken();
  await testDb()('sign_in_links').insert({
    user_id: org.office.id,
    purpose: 'password_reset',
    token_hash: hashLinkToken(token),
    expires_at: new Date(Date.now() + minutesLeft * 60_000),
    used_at: used ? new Date() : null,
  });
  return token;
}

async function invitation(daysLeft: number): Promise<{ token: string; email: string }> {
  const token = newLinkToken();
  const email = `invited-${randomUUID().slice(0, 8)}@fixtures.test`;
  await testDb()('invitations').insert({
    organisation_id: org.id,
    email,
    role: 'auditor',
    token_hash: hashLinkToken(token),
    invited_by: org.owner.id,
    expires_at: new Date(Date.now() + daysLeft * 24 * 3600_000),
  });
  return { token, email };
}

describe('password reset', () => {
  it('hashes nothing for an unknown, expired or used token, and changes no password', async () => {
    const before = await testDb()('users').where({ id: org.office.id }).first('password_hash');
    const tokens = [newLinkToken(), await resetLink(-1), await resetLink(30, true)];
    hashes.count = 0;
    for (const token of tokens) expect(await resetPassword(token, newPassword, null)).toBe(false);
    expect(hashes.count).toBe(0);
    const after = await testDb()('users').where({ id: org.office.id }).first('password_hash');
    expect(after.password_hash).toBe(before.password_hash);
  });

  it('hashes the new password once for a live token and sets it', async () => {
    const token = await resetLink(30);
    hashes.count = 0;
    expect(await resetPassword(token, newPassword, null)).toBe(true);
    expect(hashes.count).toBe(1);
    // The same token a second time is used up: refused without a hash.
    expect(await resetPassword(token, newPassword, null)).toBe(false);
    expect(hashes.count).toBe(1);
  });
});

describe('invitation accept', () => {
  it('hashes nothing for an unknown or expired invitation, and creates no account', async () => {
    const expired = await invitation(-1);
    hashes.count = 0;
    for (const token of [newLinkToken(), expired.token])
      await expect(
        acceptInvitation(token, { name: 'Someone', password: newPassword }, null),
      ).rejects.toMatchObject({ kind: 'not_found' });
    expect(hashes.count).toBe(0);
    expect(await testDb()('users').where({ email: expired.email }).first('id')).toBeUndefined();
  });

  it('hashes the password once for a live invitation and creates the account', async () => {
    const live = await invitation(7);
    hashes.count = 0;
    const user = await acceptInvitation(
      live.token,
      { name: 'Invited Auditor', password: newPassword },
      null,
    );
    expect(user.email).toBe(live.email);
    expect(hashes.count).toBe(1);
  });
});
