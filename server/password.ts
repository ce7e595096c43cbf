/**
 * Password hashing with scrypt (node:crypto). The cost parameters are stored in each hash, so a
 * hash made at one cost verifies after the default changes. Format: scrypt$N$r$p$salt$key (base64url).
 */
import { randomBytes, scrypt as scryptCb, timingSafeEqual } from 'node:crypto';
import type { ScryptCost } from './config';

function scrypt(password: string, salt: Buffer, keylen: number, c: ScryptCost): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    scryptCb(password.normalize('NFKC'), salt, keylen, { N: c.N, r: c.r, p: c.p, maxmem: 256 * c.N * c.r + 1024 * 1024 }, (err, key) =>
      err ? reject(err) : resolve(key),
    );
  });
}

export async function hashPassword(password: string, cost: ScryptCost): Promise<string> {
  const salt = randomBytes(16);
  const key = await scrypt(password, salt, 32, cost);
  return ['scrypt', cost.N, cost.r, cost.p, salt.toString('base64url'), key.toString('base64url')].join('$');
}

export async function verifyPassword(hash: string, password: string): Promise<boolean> {
  const parts = hash.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  if (![N, r, p].every((v) => Number.isInteger(v) && v > 0) || N > 2 ** 20) return false;
  const salt = Buffer.from(parts[4], 'base64url');
  const want = Buffer.from(parts[5], 'base64url');
  const got = await scrypt(password, salt, want.length, { N, r, p });
  return got.length === want.length && timingSafeEqual(got, want);
}
