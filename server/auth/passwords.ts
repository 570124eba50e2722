// Password hashing with scrypt (node:crypto): random 16-byte salt, 64-byte key, constant-time
// comparison. Stored as "scrypt$N$r$p$<salt b64>$<hash b64>" so the cost can rise later and old
// hashes still verify with their own parameters.
import { randomBytes, scrypt as scryptCb, timingSafeEqual, type ScryptOptions } from 'node:crypto';

function scrypt(password: string, salt: Buffer, keylen: number, opts: ScryptOptions): Promise<Buffer> {
  return new Promise((resolve, reject) =>
    scryptCb(password.normalize('NFKC'), salt, keylen, opts, (err, key) => (err ? reject(err) : resolve(key))),
  );
}

/** N = 2^15, r = 8, p = 1: the interactive-login cost commonly recommended (common practice). */
export const SCRYPT_PARAMS = { N: 32768, r: 8, p: 1 } as const;
const KEYLEN = 64;
const SALT_BYTES = 16;
// 128·N·r bytes are needed (32 MiB at these parameters); leave headroom over Node's 32 MiB default.
const MAXMEM = 64 * 1024 * 1024;

export async function hashPassword(password: string, params: { N: number; r: number; p: number } = SCRYPT_PARAMS): Promise<string> {
  const salt = randomBytes(SALT_BYTES);
  const key = await scrypt(password, salt, KEYLEN, { ...params, maxmem: MAXMEM });
  return ['scrypt', params.N, params.r, params.p, salt.toString('base64'), key.toString('base64')].join('$');
}

/** False for a wrong password and for a malformed stored hash (never throws on bad input). */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  if (![N, r, p].every((n) => Number.isInteger(n) && n > 0)) return false;
  const salt = Buffer.from(parts[4], 'base64');
  const expected = Buffer.from(parts[5], 'base64');
  if (salt.length === 0 || expected.length === 0) return false;
  const key = await scrypt(password, salt, expected.length, { N, r, p, maxmem: MAXMEM });
  return timingSafeEqual(key, expected);
}

let dummyHash: Promise<string> | null = null;
/**
 * Verify against a throwaway hash so that "no such e-mail" takes as long as "wrong password"
 * (sign-in must not reveal which part was wrong, by its answer or by its timing).
 */
export async function burnPasswordCheck(password: string): Promise<void> {
  dummyHash ??= hashPassword('not-a-real-password-0000');
  await verifyPassword(password, await dummyHash);
}
