// Single-use link tokens (invitations, password resets): 32 random bytes, base64url. Only the
// SHA-256 of a token is stored, so a database leak does not hand out working links.
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';

export function newLinkToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, tokenHash: hashLinkToken(token) };
}

export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** CSRF synchronizer token kept in the session. */
export function newCsrfToken(): string {
  return randomBytes(32).toString('base64url');
}

export function safeEqualStrings(a: string, b: string): boolean {
  const ab = Buffer.from(a, 'utf8');
  const bb = Buffer.from(b, 'utf8');
  return ab.length === bb.length && timingSafeEqual(ab, bb);
}
