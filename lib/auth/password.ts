import { randomBytes, scrypt as scryptCb, timingSafeEqual, type ScryptOptions } from 'node:crypto';

const scrypt = (pw: string, salt: Buffer, len: number, opts: ScryptOptions) =>
  new Promise<Buffer>((resolve, reject) =>
    scryptCb(pw, salt, len, opts, (err, key) => (err ? reject(err) : resolve(key))),
  );

export const MIN_PASSWORD_LENGTH = 12;
const N = 16384;
const R = 8;
const P = 1;
const KEY_LEN = 32;

/**
 * Hashes a password with scrypt (node:crypto, RFC 7914), encoded as `scrypt$N$r$p$salt$hash`.
 * `await verifyPassword('correct horse battery', await hashPassword('correct horse battery')) === true`
 */
export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(16);
  const key = await scrypt(password, salt, KEY_LEN, { N, r: R, p: P });
  return ['scrypt', N, R, P, salt.toString('base64url'), key.toString('base64url')].join('$');
}

export async function verifyPassword(password: string, encoded: string | null | undefined): Promise<boolean> {
  if (!encoded) return false;
  const parts = encoded.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [, n, r, p, saltB64, keyB64] = parts;
  const expected = Buffer.from(keyB64, 'base64url');
  const key = await scrypt(password, Buffer.from(saltB64, 'base64url'), expected.length, {
    N: Number(n),
    r: Number(r),
    p: Number(p),
  });
  return key.length === expected.length && timingSafeEqual(key, expected);
}

/** A random temporary password, long enough for the policy and easy to read out. */
export function temporaryPassword(): string {
  return randomBytes(12).toString('base64url').replace(/[-_]/g, 'x').slice(0, 16);
}
