import { describe, expect, it } from 'vitest';
import { hashPassword, verifyPassword } from '../../server/password';
import { ASVS_SCRYPT } from '../../server/config';

describe('password hashing', () => {
  it('uses the ASVS cost by default and verifies (N = 2^15, r = 8, p = 3: RELIABILITY.md)', async () => {
    expect(ASVS_SCRYPT).toEqual({ N: 32768, r: 8, p: 3 });
    const h = await hashPassword('a long passphrase 42', ASVS_SCRYPT);
    expect(h.startsWith('scrypt$32768$8$3$')).toBe(true);
    expect(await verifyPassword(h, 'a long passphrase 42')).toBe(true);
    expect(await verifyPassword(h, 'a long passphrase 43')).toBe(false);
  });
  it('rejects malformed hashes without throwing', async () => {
    expect(await verifyPassword('plain', 'x')).toBe(false);
    expect(await verifyPassword('scrypt$99999999$8$1$AA$AA', 'x')).toBe(false);
  });
});
