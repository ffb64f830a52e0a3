/**
 * One-time tokens for e-mailed links (sign-in links, invitations). The link carries the
 * random token; the database keeps only its SHA-256, so a leaked table cannot be replayed.
 */
import { createHash, randomBytes } from 'node:crypto';

/** 32 random bytes, URL-safe: what goes into the e-mailed link. */
export function newLinkToken(): string {
  return randomBytes(32).toString('base64url');
}

export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** Shape check before any lookup, so junk never reaches the database. */
export function looksLikeLinkToken(token: unknown): token is string {
  return typeof token === 'string' && /^[A-Za-z0-9_-]{43}$/.test(token);
}
