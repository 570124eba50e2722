import { describe, expect, it } from 'vitest';
import { hashPassword, SCRYPT_PARAMS, verifyPassword } from './passwords';

describe('password hashing (scrypt)', () => {
  it('verifies the right password and refuses a wrong one', async () => {
    const stored = await hashPassword('correct horse battery');
    expect(await verifyPassword('correct horse battery', stored)).toBe(true);
    expect(await verifyPassword('correct horse batterY', stored)).toBe(false);
    expect(await verifyPassword('', stored)).toBe(false);
  });

  it('stores the cost parameters and a random salt: the same password hashes differently each time', async () => {
    const a = await hashPassword('same password');
    const b = await hashPassword('same password');
    expect(a).not.toBe(b);
    const [scheme, N, r, p, salt, key] = a.split('$');
    expect([scheme, Number(N), Number(r), Number(p)]).toEqual(['scrypt', SCRYPT_PARAMS.N, SCRYPT_PARAMS.r, SCRYPT_PARAMS.p]);
    expect(Buffer.from(salt, 'base64')).toHaveLength(16);
    expect(Buffer.from(key, 'base64')).toHaveLength(64);
  });

  it('verifies with the parameters stored in the hash (a later cost change keeps old hashes valid)', async () => {
    const cheap = await hashPassword('older account', { N: 1024, r: 8, p: 1 });
    expect(cheap.startsWith('scrypt$1024$8$1$')).toBe(true);
    expect(await verifyPassword('older account', cheap)).toBe(true);
    expect(await verifyPassword('older accounT', cheap)).toBe(false);
  });

  it('matches the scrypt test vector of RFC 7914 §12 (standard)', async () => {
    // scrypt(P="password", S="NaCl", N=1024, r=8, p=16, dkLen=64)
    const dk =
      'fdbabe1c9d3472007856e7190d01e9fe7c6ad7cbc8237830e77376634b3731622eaf30d92e22a3886ff109279d9830dac727afb94a83ee6d8360cbdfa2cc0640';
    const stored = ['scrypt', 1024, 8, 16, Buffer.from('NaCl').toString('base64'), Buffer.from(dk, 'hex').toString('base64')].join('$');
    expect(await verifyPassword('password', stored)).toBe(true);
    expect(await verifyPassword('Password', stored)).toBe(false);
  });

  it('treats malformed stored hashes as a mismatch instead of throwing', async () => {
    for (const bad of ['', 'x', 'bcrypt$1$2$3$4$5', 'scrypt$abc$8$1$c2FsdA==$a2V5', 'scrypt$1024$8$1$$', 'scrypt$1024$8$1$c2FsdA==']) {
      expect(await verifyPassword('anything', bad)).toBe(false);
    }
  });
});
