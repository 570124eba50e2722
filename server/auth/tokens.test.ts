import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { linkTokenSchema } from '../../shared/api/common';
import { hashLinkToken, newCsrfToken, newLinkToken, safeEqualStrings } from './tokens';

describe('link tokens', () => {
  it('are 32 random bytes in base64url, accepted by the shared token schema, stored as their SHA-256', () => {
    const { token, tokenHash } = newLinkToken();
    expect(Buffer.from(token, 'base64url')).toHaveLength(32);
    expect(linkTokenSchema.safeParse(token).success).toBe(true);
    expect(tokenHash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(hashLinkToken(token)).toBe(tokenHash);
    expect(newLinkToken().token).not.toBe(token);
  });

  it('CSRF tokens differ each time and compare in constant time', () => {
    const a = newCsrfToken();
    expect(a).not.toBe(newCsrfToken());
    expect(safeEqualStrings(a, a)).toBe(true);
    expect(safeEqualStrings(a, a.slice(0, -1))).toBe(false);
    expect(safeEqualStrings(a, `${a.slice(0, -1)}${a.endsWith('A') ? 'B' : 'A'}`)).toBe(false);
  });
});
